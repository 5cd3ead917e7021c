/** The live preview of the server's reduction, beside the form: what a hand-in would store now. */
import type { DropLogWarning } from "~/lib/drop-logs/reduce-drop-log";
import { ReductionSummary, WarningList, figure } from "./reduction-summary";
import { StrayDropComparison } from "./reduction-result";
import type { Preview } from "./use-reduction-preview";

export function PreviewPanel({
  preview,
  kind,
  formWarnings,
}: {
  preview: Preview;
  kind: "drag" | "viscometry";
  formWarnings: DropLogWarning[];
}) {
  return (
    <section aria-labelledby="preview-heading" aria-live="polite" className="rounded-lg bg-paper-100 p-4 ring-1 ring-ink-900/10">
      <h3 id="preview-heading" className="font-semibold">
        Preview {preview.status === "loading" ? <span className="text-sm font-normal text-ink-600">(updating…)</span> : null}
      </h3>
      {preview.status === "idle" ? <p className="text-sm text-ink-700">Enter the temperature and a drop time to see your result.</p> : null}
      {preview.status === "error" ? <p className="text-sm text-outlier">{preview.message}</p> : null}
      {preview.status === "ready" ? (
        <>
          <ReductionSummary reduction={preview.result.reduction} normalisedFigure={preview.result.normalisedFigure} />
          <WarningList warnings={formWarnings} />
          <StrayDropComparison
            reduction={preview.result.reduction}
            normalisedFigure={preview.result.normalisedFigure}
            referenceViscosity={preview.result.kitRecords.fluidLot.viscosityPaS}
          />
          <p className="mt-2 text-xs text-ink-600">
            Computed by the server from your kit's records
            {kind === "drag"
              ? `, with the fluid's viscosity ${figure(preview.result.kitRecords.fluidLot.viscosityPaS)} Pa·s at your temperature`
              : ""}
            . Handing in stores this result.
          </p>
        </>
      ) : null}
    </section>
  );
}
