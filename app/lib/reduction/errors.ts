/** One problem found in the input of a reduction, named by its path in the input object. */
export interface ReductionIssue {
  /** Dotted path of the offending field, e.g. `sphere.diameter` or `drops.3`. */
  path: string;
  message: string;
}

/**
 * Thrown when the input cannot be reduced at all (zero or negative sizes, no drops, NaN, a missing
 * viscosity in drag mode, …). It lists every problem at once so a form can show them all together,
 * rather than one per submission.
 */
export class ReductionInputError extends Error {
  readonly issues: ReductionIssue[];

  constructor(issues: ReductionIssue[]) {
    super(`Invalid reduction input: ${issues.map((issue) => `${issue.path}: ${issue.message}`).join("; ")}`);
    this.name = "ReductionInputError";
    this.issues = issues;
  }
}

/** Collects issues while an input is checked, and throws them together at the end. */
export class IssueList {
  private issues: ReductionIssue[] | undefined;

  add(path: string, message: string): void {
    (this.issues ??= []).push({ path, message });
  }

  /** A number that must be finite and strictly positive (a size, a density, a time). */
  positive(path: string, value: unknown): void {
    if (typeof value !== "number" || Number.isNaN(value)) this.add(path, "must be a number");
    else if (!Number.isFinite(value)) this.add(path, "must be finite");
    else if (value <= 0) this.add(path, "must be greater than zero");
  }

  /** A number that may be absent but, when given, must be finite and ≥ 0 (an uncertainty). */
  optionalNonNegative(path: string, value: unknown): void {
    if (value === undefined) return;
    if (typeof value !== "number" || !Number.isFinite(value)) this.add(path, "must be a finite number");
    else if (value < 0) this.add(path, "must not be negative");
  }

  optionalPositive(path: string, value: unknown): void {
    if (value !== undefined) this.positive(path, value);
  }

  optionalFinite(path: string, value: unknown): void {
    if (value === undefined) return;
    if (typeof value !== "number" || !Number.isFinite(value)) this.add(path, "must be a finite number");
  }

  throwIfAny(): void {
    if (this.issues) throw new ReductionInputError(this.issues);
  }
}
