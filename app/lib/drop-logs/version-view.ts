/**
 * A stored drop-log version as pages show it (dates as ISO strings, the JSON columns typed), for the
 * student's own page and the staff's view of a hand-in alike.
 */
import type { DropLogInput } from "./drop-log-input";
import type { KitRecords, StoredReduction } from "./reduce-drop-log";

type StoredVersionRow = {
  id: string;
  version: number;
  late: boolean;
  submittedAt: Date;
  input: DropLogInput;
  kitRecords: KitRecords;
  reduction: StoredReduction;
  normalisedFigure: number | null;
};
type StoredPhotoRow = { id: string; versionId: string | null; originalName: string | null; bytes: number; createdAt: Date };

export function versionView(version: StoredVersionRow) {
  return {
    id: version.id,
    version: version.version,
    late: version.late,
    submittedAt: version.submittedAt.toISOString(),
    input: version.input,
    kitRecords: version.kitRecords,
    reduction: version.reduction,
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
