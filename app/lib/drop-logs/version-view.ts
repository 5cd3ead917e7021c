/**
 * A stored drop-log version as pages show it (dates as ISO strings, the JSON columns typed), for the
 * student's own page and the staff's view of a hand-in alike.
 */
import type { DropLogInput } from "./drop-log-input";
import type { DropLogWarning, KitRecords } from "./reduce-drop-log";
import type { Reduction } from "~/lib/reduction";

type StoredVersionRow = {
  id: string;
  version: number;
  late: boolean;
  submittedAt: Date;
  input: Record<string, unknown>;
  kitRecords: Record<string, unknown>;
  reduction: Record<string, unknown>;
  normalisedFigure: number | null;
};
type StoredPhotoRow = { id: string; versionId: string | null; originalName: string | null; bytes: number; createdAt: Date };

export function versionView(version: StoredVersionRow) {
  return {
    id: version.id,
    version: version.version,
    late: version.late,
    submittedAt: version.submittedAt.toISOString(),
    input: version.input as DropLogInput,
    kitRecords: version.kitRecords as KitRecords,
    reduction: version.reduction as unknown as Reduction & { warnings: DropLogWarning[] },
    normalisedFigure: version.normalisedFigure,
  };
}
export type VersionView = ReturnType<typeof versionView>;

export const photoView = (photo: StoredPhotoRow) => ({
  id: photo.id,
  versionId: photo.versionId,
  originalName: photo.originalName,
  bytes: photo.bytes,
  createdAt: photo.createdAt.toISOString(),
});
export type PhotoView = ReturnType<typeof photoView>;
