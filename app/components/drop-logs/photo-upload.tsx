/** Photos of the set-up, sent by script to the student's draft; the next hand-in attaches them to its version. */
import { useFetcher } from "react-router";
import { Button } from "~/components/ui/button";
import { MAX_PHOTO_MEGABYTES, MAX_PHOTOS_PER_DROP_LOG } from "~/lib/drop-logs/photo-limits";
import type { PhotoView } from "~/lib/drop-logs/version-view";
import { PhotoList } from "./version-history";

export function PhotoUpload({ courseId, labId, draftPhotos }: { courseId: string; labId: string; draftPhotos: PhotoView[] }) {
  const fetcher = useFetcher<{ error?: string; photos?: unknown[] }>();
  return (
    <section aria-labelledby="photos-heading" className="rounded-lg bg-white p-4 shadow-sm ring-1 ring-ink-900/10">
      <h2 id="photos-heading" className="text-lg font-semibold">
        Photos of your set-up
      </h2>
      <p className="text-sm text-ink-700">
        JPEG, PNG or WebP, up to {MAX_PHOTO_MEGABYTES} MB each and {MAX_PHOTOS_PER_DROP_LOG} per drop log. They go with your next hand-in.
      </p>
      <fetcher.Form
        method="post"
        encType="multipart/form-data"
        action={`/courses/${courseId}/labs/${labId}/photos`}
        className="mt-2 flex flex-wrap items-center gap-3"
      >
        <input
          type="file"
          name="photo"
          accept="image/jpeg,image/png,image/webp"
          multiple
          aria-label="Photos to upload"
          className="text-sm file:mr-3 file:cursor-pointer file:rounded-md file:border-0 file:bg-white file:px-4 file:py-2 file:text-sm file:font-medium file:ring-1 file:ring-ink-900/20"
        />
        <Button type="submit" variant="secondary" disabled={fetcher.state !== "idle"}>
          {fetcher.state !== "idle" ? "Uploading…" : "Upload"}
        </Button>
      </fetcher.Form>
      {fetcher.data?.error ? <p className="mt-1 text-sm font-medium text-outlier">{fetcher.data.error}</p> : null}
      <PhotoList courseId={courseId} photos={draftPhotos} action={(photo) => <RemovePhoto courseId={courseId} photo={photo} />} />
    </section>
  );
}

function RemovePhoto({ courseId, photo }: { courseId: string; photo: Pick<PhotoView, "id" | "originalName"> }) {
  const fetcher = useFetcher();
  return (
    <fetcher.Form method="post" action={`/courses/${courseId}/photos/${photo.id}`} className="mt-1">
      <input type="hidden" name="intent" value="remove" />
      <button
        type="submit"
        disabled={fetcher.state !== "idle"}
        aria-label={`Remove ${photo.originalName ?? "this photo"} from the draft`}
        className="text-sm text-ink-700 underline hover:text-ink-900"
      >
        {fetcher.state !== "idle" ? "Removing…" : "Remove"}
      </button>
    </fetcher.Form>
  );
}
