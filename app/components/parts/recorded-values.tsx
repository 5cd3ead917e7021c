import { KitName } from "~/components/parts/kit-name";
import type { PartOnPage } from "~/components/parts/part-on-page";
import { partFieldLabels } from "~/lib/kits/part-display";
import { partToCsvRow } from "~/lib/kits/parts-csv";
import type { KitMention } from "~/server/kits/parts.server";

/** `diameter_mm` → `diameterMm`, to look up the on-screen label of a CSV column. */
const columnField = (column: string) => column.replace(/_(\w)/g, (_, letter: string) => letter.toUpperCase());

/** The part's values as recorded, and the kit it is packed in. */
export function RecordedValues({ part, kit, courseId }: { part: PartOnPage; kit: KitMention | null | undefined; courseId: string }) {
  return (
    <div>
      <h2 id="values-heading" className="mb-2 text-lg font-semibold">
        Recorded values
      </h2>
      <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
        {Object.entries(partToCsvRow(part))
          .filter(([column, value]) => value !== "" && column !== "kind" && column !== "calibration")
          .map(([column, value]) => (
            <div key={column} className="contents">
              <dt className="text-ink-600">{partFieldLabels[columnField(column)] ?? column}</dt>
              <dd>{value}</dd>
            </div>
          ))}
        <dt className="text-ink-600">Kit</dt>
        <dd>
          {kit ? (
            <>
              <KitName kit={kit} courseId={courseId} />
              {kit.id ? null : " (not a kit of your cohorts)"}
            </>
          ) : part.kind === "fluid_lot" ? (
            "Fills the bottles of the kits that name it"
          ) : (
            "In no kit"
          )}
        </dd>
      </dl>
    </div>
  );
}
