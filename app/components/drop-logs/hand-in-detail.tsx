/**
 * One student's hand-in as staff read it: the counted version's class label with its reason, then every
 * version. The hand-in page renders it, and the marking desk's side panel renders the same data,
 * loaded from that page's loader with a fetcher.
 */
import { ClassLabelTag } from "~/components/comparison/class-label";
import type { PhotoView, VersionView } from "~/lib/drop-logs/version-view";
import type { ClassComparisonLabel } from "~/lib/reduction";
import { VersionHistory } from "./version-history";

export type HandInDetailData = {
  courseId: string;
  timeZone: string;
  lab: { id: string; title: string; kind: "drag" | "viscometry" };
  studentName: string;
  classLabel: { label: ClassComparisonLabel; reason: string } | null;
  latestVersionId: string | null;
  versions: VersionView[];
  photos: PhotoView[];
};

export function HandInDetail({ handIn, headingLevel = 2 }: { handIn: HandInDetailData; headingLevel?: 2 | 3 }) {
  const Heading = `h${headingLevel}` as const;
  return (
    <div className="flex flex-col gap-4">
      <section className="rounded-lg bg-white p-4 text-sm shadow-sm ring-1 ring-ink-900/10">
        <Heading className="mb-1 font-semibold">In the class comparison</Heading>
        {handIn.classLabel ? (
          <p>
            <ClassLabelTag label={handIn.classLabel.label} />: {handIn.classLabel.reason}
          </p>
        ) : (
          <p className="text-ink-700">Not compared: nothing counted has a normalised figure.</p>
        )}
      </section>
      {handIn.versions.length === 0 ? <p className="text-ink-700">Nothing handed in yet; drafts are the student&apos;s own.</p> : null}
      <VersionHistory
        courseId={handIn.courseId}
        timeZone={handIn.timeZone}
        versions={handIn.versions}
        latestVersionId={handIn.latestVersionId}
        photos={handIn.photos}
        budgetOpen
      />
    </div>
  );
}
