/**
 * Every version of one drop log, newest first: what was entered, the server's reduction with its
 * warnings, the drop times with the stray ones marked, and the photos. The student reads it under
 * their form; staff read it on a hand-in's page and in the marking desk's side panel.
 */
import type { ReactNode } from "react";
import { DropTimesChart } from "~/components/comparison/drop-times-chart";
import { LabTime } from "~/components/drop-logs/lab-time";
import { ReductionResult } from "~/components/drop-logs/reduction-result";
import type { PhotoView, VersionView } from "~/lib/drop-logs/version-view";

export function VersionHistory({
  courseId,
  timeZone,
  versions,
  latestVersionId,
  photos,
  budgetOpen = false,
}: {
  courseId: string;
  timeZone: string;
  versions: VersionView[];
  latestVersionId: string | null;
  photos: PhotoView[];
  /** Staff pages open each version's uncertainty budget; the student's page keeps it collapsed. */
  budgetOpen?: boolean;
}) {
  return (
    <ol className="flex flex-col gap-4">
      {versions.map((version) => (
        <li key={version.id} className="rounded-lg bg-white p-4 shadow-sm ring-1 ring-ink-900/10" aria-label={`Version ${version.version}`}>
          <h3 className="font-semibold">
            Version {version.version}{" "}
            {version.id === latestVersionId ? (
              <span className="ml-1 rounded px-2 py-0.5 text-sm font-normal ring-1 ring-consistent">counts</span>
            ) : null}
            {version.late ? (
              <span className="ml-1 rounded px-2 py-0.5 text-sm font-normal text-outlier ring-1 ring-outlier">late</span>
            ) : null}
          </h3>
          <p className="text-sm text-ink-700">
            Handed in <LabTime at={version.submittedAt} courseTimeZone={timeZone} />
          </p>
          <p className="mt-1 text-sm">
            {version.input.temperatureC} °C · drops {version.input.drops.join(", ")} s
            {version.input.ownDiameterMm !== undefined || version.input.ownMassG !== undefined
              ? ` · own measurement: ${[version.input.ownDiameterMm !== undefined ? `d = ${version.input.ownDiameterMm} mm` : null, version.input.ownMassG !== undefined ? `m = ${version.input.ownMassG} g` : null].filter(Boolean).join(", ")}`
              : null}
          </p>
          {version.input.notes ? <p className="mt-1 text-sm italic text-ink-700">“{version.input.notes}”</p> : null}
          <div className="mt-2">
            <ReductionResult
              reduction={version.reduction}
              normalisedFigure={version.normalisedFigure}
              kitRecords={version.kitRecords}
              warnings={version.reduction.warnings ?? []}
              temperatureC={version.input.temperatureC}
              budgetOpen={budgetOpen}
            />
          </div>
          <div className="mt-3">
            <DropTimesChart
              id={`drops-${version.id}`}
              title={`Drop times of version ${version.version}`}
              drops={version.input.drops}
              strayDrops={version.reduction.drops.strayDrops}
            />
          </div>
          <PhotoList courseId={courseId} photos={photos.filter((photo) => photo.versionId === version.id)} />
        </li>
      ))}
    </ol>
  );
}

export function PhotoList({
  courseId,
  photos,
  action,
}: {
  courseId: string;
  photos: Pick<PhotoView, "id" | "originalName">[];
  /** Shown under each photo, e.g. the draft's Remove button. */
  action?: (photo: Pick<PhotoView, "id" | "originalName">) => ReactNode;
}) {
  if (!photos.length) return null;
  return (
    <ul className="mt-2 flex flex-wrap gap-2">
      {photos.map((photo) => (
        <li key={photo.id}>
          <a href={`/courses/${courseId}/photos/${photo.id}`} target="_blank" rel="noreferrer">
            <img
              src={`/courses/${courseId}/photos/${photo.id}`}
              alt={photo.originalName ?? "Set-up photo"}
              className="h-20 w-20 rounded object-cover ring-1 ring-ink-900/10"
              loading="lazy"
            />
          </a>
          {action?.(photo)}
        </li>
      ))}
    </ul>
  );
}
