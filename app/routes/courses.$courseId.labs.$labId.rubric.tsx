/**
 * A lab's rubric, for its instructors: criteria scored by levels, by points in a range, or
 * automatically from the hand-in and the class comparison. The form is edited in the browser and sent
 * whole; the server checks it with the same schema and answers with the problems by field, and the
 * form keeps everything typed. A rubric can also be copied from another lab of the course.
 */
import { useEffect, useState } from "react";
import { data, Form, useActionData, useNavigation, useSubmit } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.labs.$labId.rubric";
import { LabStaffNav } from "~/components/labs/lab-staff-nav";
import { Button } from "~/components/ui/button";
import { SelectField, TextAreaField, TextField } from "~/components/ui/field";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import {
  autoRuleLabels,
  autoRules,
  criterionToInput,
  describeAutoRule,
  MAX_LEVELS,
  type AutoRule,
  type CriterionKind,
} from "~/lib/marking/rubric";
import { AppError } from "~/lib/app-error";
import { db } from "~/server/db.server";
import { copyRubric, listRubricSources, saveRubric } from "~/server/marking/rubrics.server";
import { requireLabAccess } from "~/server/labs/lab-access.server";
import { loadMarkingLab } from "~/server/marking/marking-lab.server";

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const { access, lab } = await requireLabAccess({ request, context }, params, ["instructor"], loadMarkingLab);
  const sources = await listRubricSources(db, { access, labId: lab.id });
  return {
    courseId: access.course.id,
    lab: { id: lab.id, title: lab.title, requiredDrops: lab.requiredDrops, releasedAt: lab.marking.releasedAt?.toISOString() ?? null },
    criteria: lab.rubric.map((criterion) => criterionToInput(criterion)),
    sources,
  };
}

const rubricAction = z.discriminatedUnion("intent", [
  z.object({ intent: z.literal("save"), criteria: z.array(z.unknown()) }),
  z.object({ intent: z.literal("copy"), fromLabId: z.uuid("Choose a lab to copy from.") }),
]);

export async function action({ request, context, params }: Route.ActionArgs) {
  const { access, lab } = await requireLabAccess({ request, context }, params, ["instructor"], loadMarkingLab);
  const parsed = rubricAction.safeParse(
    request.headers.get("content-type")?.includes("json")
      ? await request.json().catch(() => null)
      : Object.fromEntries(await request.formData()),
  );
  if (!parsed.success)
    return data(
      { errors: { form: parsed.error.issues[0]?.message ?? "The rubric cannot be read." } as Record<string, string> },
      { status: 400 },
    );
  try {
    if (parsed.data.intent === "copy") {
      const copied = await copyRubric(db, { access, lab, fromLabId: parsed.data.fromLabId, request });
      return { done: `Copied ${copied.length} criteria.` };
    }
    const saved = await saveRubric(db, { access, lab, input: { criteria: parsed.data.criteria }, request });
    return { done: `The rubric is saved: ${saved.length} criteria.` };
  } catch (error) {
    if (!(error instanceof AppError)) throw error;
    const issues = error.issues ?? [{ path: ["form"], message: error.message }];
    return data(
      { errors: Object.fromEntries(issues.map((issue) => [issue.path.join("."), issue.message])) as Record<string, string> },
      { status: error.status },
    );
  }
}

/** A criterion as the form holds it: numbers stay text until sent, so a half-typed value is never lost. */
type Draft = {
  key: string;
  id?: string;
  title: string;
  description: string;
  kind: CriterionKind;
  levels: { points: string; description: string }[];
  minPoints: string;
  maxPoints: string;
  rule: AutoRule;
  tolerancePercent: string;
  suspectPoints: string;
  latePenaltyPoints: string;
};

const text = (value: number | undefined | null) => (value === undefined || value === null ? "" : String(value));
let drafted = 0;
const newKey = () => `criterion-${++drafted}`;

function toDraft(input: ReturnType<typeof criterionToInput>): Draft {
  const blank = {
    levels: [],
    minPoints: "0",
    maxPoints: "",
    rule: "required_drops" as AutoRule,
    tolerancePercent: "",
    suspectPoints: "",
    latePenaltyPoints: "",
  };
  const common = { key: input.id ?? newKey(), id: input.id, title: input.title, description: input.description ?? "" };
  if (input.kind === "levels")
    return {
      ...blank,
      ...common,
      kind: "levels",
      levels: input.levels.map((level) => ({ points: text(level.points), description: level.description })),
    };
  if (input.kind === "range")
    return { ...blank, ...common, kind: "range", minPoints: text(input.minPoints), maxPoints: text(input.maxPoints) };
  return {
    ...blank,
    ...common,
    kind: "auto",
    rule: input.rule,
    maxPoints: text(input.maxPoints),
    tolerancePercent: text(input.params?.tolerancePercent),
    suspectPoints: text(input.params?.suspectPoints),
    latePenaltyPoints: text(input.params?.latePenaltyPoints),
  };
}

const number = (value: string) => (value.trim() === "" ? null : Number(value.trim().replace(",", ".")));
const optional = (value: string) => (value.trim() === "" ? undefined : Number(value.trim().replace(",", ".")));

function toInput(draft: Draft) {
  const common = { ...(draft.id ? { id: draft.id } : {}), title: draft.title, description: draft.description };
  if (draft.kind === "levels")
    return {
      ...common,
      kind: "levels",
      levels: draft.levels.map((level) => ({ points: number(level.points), description: level.description })),
    };
  if (draft.kind === "range") return { ...common, kind: "range", minPoints: number(draft.minPoints), maxPoints: number(draft.maxPoints) };
  return {
    ...common,
    kind: "auto",
    rule: draft.rule,
    maxPoints: number(draft.maxPoints),
    params: {
      tolerancePercent: optional(draft.tolerancePercent),
      suspectPoints: optional(draft.suspectPoints),
      latePenaltyPoints: optional(draft.latePenaltyPoints),
    },
  };
}

const starter = (kind: CriterionKind): Draft => ({
  key: newKey(),
  title: "",
  description: "",
  kind,
  levels:
    kind === "levels"
      ? [
          { points: "0", description: "" },
          { points: "", description: "" },
        ]
      : [],
  minPoints: "0",
  maxPoints: "",
  rule: "required_drops",
  tolerancePercent: "10",
  suspectPoints: "",
  latePenaltyPoints: "",
});

export default function RubricPage({ loaderData }: Route.ComponentProps) {
  const { courseId, lab, sources } = loaderData;
  const actionData = useActionData<typeof action>();
  const navigation = useNavigation();
  const submit = useSubmit();
  const [drafts, setDrafts] = useState<Draft[]>(() => loaderData.criteria.map(toDraft));
  // Once saved, the form starts again from what the server stored, so new criteria carry their ids.
  useEffect(() => {
    if (actionData && "done" in actionData) setDrafts(loaderData.criteria.map(toDraft));
  }, [loaderData.criteria]);
  const errors: Record<string, string> = actionData && "errors" in actionData ? actionData.errors : {};
  const error = (index: number, field: string) => errors[`criteria.${index}.${field}`];
  const update = (index: number, patch: Partial<Draft>) =>
    setDrafts((current) => current.map((draft, at) => (at === index ? { ...draft, ...patch } : draft)));
  const move = (index: number, step: -1 | 1) =>
    setDrafts((current) => {
      const next = [...current];
      [next[index], next[index + step]] = [next[index + step], next[index]];
      return next;
    });
  const locked = lab.releasedAt !== null;
  const busy = navigation.state === "submitting";
  const maxTotal = drafts.reduce((sum, draft) => {
    const points =
      draft.kind === "levels" ? Math.max(0, ...draft.levels.map((level) => Number(level.points) || 0)) : Number(draft.maxPoints) || 0;
    return sum + points;
  }, 0);

  return (
    <div className="flex max-w-4xl flex-col gap-6">
      <PageHeader
        title={lab.title}
        trail={[{ to: `/courses/${courseId}/labs`, label: "Labs" }]}
        tabs={<LabStaffNav courseId={courseId} labId={lab.id} instructor />}
      >
        Rubric · {drafts.length} criteria · out of {maxTotal} points
      </PageHeader>
      {actionData && "done" in actionData ? <Notice tone="success">{actionData.done}</Notice> : null}
      {errors.form ? <Notice tone="error">{errors.form}</Notice> : null}
      {Object.keys(errors).some((key) => key !== "form") ? (
        <Notice tone="error">Some criteria need correcting; see the messages beside them. Nothing was saved.</Notice>
      ) : null}
      {locked ? <Notice tone="info">Marks of this lab are released, so its rubric is kept as the students saw it.</Notice> : null}

      {sources.length && !locked ? (
        <Form method="post" className="flex flex-wrap items-end gap-3 rounded-lg bg-white p-4 shadow-sm ring-1 ring-ink-900/10">
          <input type="hidden" name="intent" value="copy" />
          <SelectField label="Copy the rubric of another lab" name="fromLabId" className="min-w-64" defaultValue={sources[0].labId}>
            {sources.map((source) => (
              <option key={source.labId} value={source.labId}>
                {source.title} ({source.criteria} criteria)
              </option>
            ))}
          </SelectField>
          <Button type="submit" variant="secondary" disabled={busy}>
            Copy it here
          </Button>
          <p className="w-full text-xs text-ink-700">Replaces this lab&apos;s criteria; only possible before anyone is marked.</p>
        </Form>
      ) : null}

      <form
        className="flex flex-col gap-4"
        onSubmit={(event) => {
          event.preventDefault();
          // Through JSON and back: empty optional fields (undefined) drop out, as the schema wants them absent.
          submit(JSON.parse(JSON.stringify({ intent: "save", criteria: drafts.map(toInput) })), {
            method: "post",
            encType: "application/json",
          });
        }}
      >
        <ol className="flex flex-col gap-4">
          {drafts.map((draft, index) => (
            <li key={draft.key} className="rounded-lg bg-white p-4 shadow-sm ring-1 ring-ink-900/10">
              <fieldset disabled={locked} className="flex flex-col gap-3">
                <legend className="sr-only">Criterion {index + 1}</legend>
                <div className="grid gap-3 sm:grid-cols-[1fr_12rem]">
                  <TextField
                    label={`Criterion ${index + 1}`}
                    value={draft.title}
                    onChange={(event) => update(index, { title: event.target.value })}
                    error={error(index, "title")}
                    required
                  />
                  <SelectField
                    label="Scored by"
                    value={draft.kind}
                    onChange={(event) =>
                      update(index, {
                        ...starter(event.target.value as CriterionKind),
                        key: draft.key,
                        id: draft.id,
                        title: draft.title,
                        description: draft.description,
                      })
                    }
                  >
                    <option value="levels">levels</option>
                    <option value="range">points in a range</option>
                    <option value="auto">automatically</option>
                  </SelectField>
                </div>
                <TextAreaField
                  label="What it looks for"
                  rows={2}
                  value={draft.description}
                  onChange={(event) => update(index, { description: event.target.value })}
                  error={error(index, "description")}
                />
                {draft.kind === "levels" ? (
                  <div className="flex flex-col gap-2">
                    {draft.levels.map((level, levelIndex) => (
                      <div key={levelIndex} className="grid items-start gap-2 sm:grid-cols-[7rem_1fr_auto]">
                        <TextField
                          label={`Level ${levelIndex + 1}`}
                          unit="pts"
                          inputMode="decimal"
                          value={level.points}
                          onChange={(event) =>
                            update(index, {
                              levels: draft.levels.map((entry, at) =>
                                at === levelIndex ? { ...entry, points: event.target.value } : entry,
                              ),
                            })
                          }
                          error={error(index, `levels.${levelIndex}.points`)}
                        />
                        <TextField
                          label="Description"
                          value={level.description}
                          onChange={(event) =>
                            update(index, {
                              levels: draft.levels.map((entry, at) =>
                                at === levelIndex ? { ...entry, description: event.target.value } : entry,
                              ),
                            })
                          }
                          error={error(index, `levels.${levelIndex}.description`)}
                        />
                        <button
                          type="button"
                          className="mt-6 min-h-9 px-2 text-sm underline"
                          onClick={() => update(index, { levels: draft.levels.filter((_, at) => at !== levelIndex) })}
                        >
                          Remove<span className="sr-only"> level {levelIndex + 1}</span>
                        </button>
                      </div>
                    ))}
                    {error(index, "levels") ? <p className="text-sm text-outlier">{error(index, "levels")}</p> : null}
                    {draft.levels.length < MAX_LEVELS ? (
                      <button
                        type="button"
                        className="self-start text-sm underline"
                        onClick={() => update(index, { levels: [...draft.levels, { points: "", description: "" }] })}
                      >
                        Add a level
                      </button>
                    ) : null}
                  </div>
                ) : draft.kind === "range" ? (
                  <div className="grid gap-3 sm:grid-cols-2">
                    <TextField
                      label="Fewest points"
                      unit="pts"
                      inputMode="decimal"
                      value={draft.minPoints}
                      onChange={(event) => update(index, { minPoints: event.target.value })}
                      error={error(index, "minPoints")}
                    />
                    <TextField
                      label="Most points"
                      unit="pts"
                      inputMode="decimal"
                      value={draft.maxPoints}
                      onChange={(event) => update(index, { maxPoints: event.target.value })}
                      error={error(index, "maxPoints")}
                    />
                  </div>
                ) : (
                  <div className="grid gap-3 sm:grid-cols-2">
                    <SelectField
                      label="Rule"
                      value={draft.rule}
                      onChange={(event) => update(index, { rule: event.target.value as AutoRule })}
                      error={error(index, "rule")}
                    >
                      {autoRules.map((rule) => (
                        <option key={rule} value={rule}>
                          {autoRuleLabels[rule]}
                        </option>
                      ))}
                    </SelectField>
                    <TextField
                      label="Points"
                      unit="pts"
                      inputMode="decimal"
                      value={draft.maxPoints}
                      onChange={(event) => update(index, { maxPoints: event.target.value })}
                      error={error(index, "maxPoints")}
                    />
                    {draft.rule === "within_reference" ? (
                      <TextField
                        label="Tolerance"
                        unit="%"
                        inputMode="decimal"
                        value={draft.tolerancePercent}
                        onChange={(event) => update(index, { tolerancePercent: event.target.value })}
                        error={error(index, "params.tolerancePercent")}
                      />
                    ) : null}
                    {draft.rule === "not_outlier" ? (
                      <TextField
                        label="Points when suspect"
                        unit="pts"
                        inputMode="decimal"
                        hint="Half the points when empty."
                        value={draft.suspectPoints}
                        onChange={(event) => update(index, { suspectPoints: event.target.value })}
                        error={error(index, "params.suspectPoints")}
                      />
                    ) : null}
                    {draft.rule === "on_time" ? (
                      <TextField
                        label="Taken off when late"
                        unit="pts"
                        inputMode="decimal"
                        hint="All the points when empty."
                        value={draft.latePenaltyPoints}
                        onChange={(event) => update(index, { latePenaltyPoints: event.target.value })}
                        error={error(index, "params.latePenaltyPoints")}
                      />
                    ) : null}
                    <p className="text-sm text-ink-700 sm:col-span-2">
                      {describeAutoRule(
                        {
                          autoRule: draft.rule,
                          maxPoints: Number(draft.maxPoints) || 0,
                          autoParams: {
                            tolerancePercent: optional(draft.tolerancePercent),
                            suspectPoints: optional(draft.suspectPoints),
                            latePenaltyPoints: optional(draft.latePenaltyPoints),
                          },
                        },
                        lab.requiredDrops,
                      )}{" "}
                      A marker may override it, with a reason.
                    </p>
                  </div>
                )}
                <div className="flex flex-wrap gap-3 text-sm">
                  <button
                    type="button"
                    className="min-h-9 underline disabled:opacity-50"
                    disabled={index === 0}
                    onClick={() => move(index, -1)}
                  >
                    Move up
                  </button>
                  <button
                    type="button"
                    className="min-h-9 underline disabled:opacity-50"
                    disabled={index === drafts.length - 1}
                    onClick={() => move(index, 1)}
                  >
                    Move down
                  </button>
                  <button
                    type="button"
                    className="min-h-9 text-outlier underline"
                    onClick={() => setDrafts((current) => current.filter((_, at) => at !== index))}
                  >
                    Remove the criterion
                  </button>
                </div>
              </fieldset>
            </li>
          ))}
        </ol>
        {errors.criteria ? <Notice tone="error">{errors.criteria}</Notice> : null}
        {!locked ? (
          <div className="flex flex-wrap gap-3">
            <Button type="button" variant="secondary" onClick={() => setDrafts((current) => [...current, starter("levels")])}>
              Add a levels criterion
            </Button>
            <Button type="button" variant="secondary" onClick={() => setDrafts((current) => [...current, starter("range")])}>
              Add a points criterion
            </Button>
            <Button type="button" variant="secondary" onClick={() => setDrafts((current) => [...current, starter("auto")])}>
              Add an automatic criterion
            </Button>
            <Button type="submit" disabled={busy}>
              {busy ? "Saving…" : "Save the rubric"}
            </Button>
          </div>
        ) : null}
      </form>
    </div>
  );
}

export function meta({ data: loaderData }: Route.MetaArgs) {
  return [{ title: `Rubric: ${loaderData?.lab.title ?? "lab"} · Benchpost` }];
}
