/**
 * How many set-up photos Benchpost keeps, and how large: shared by the upload check on the server and
 * the words on the lab page.
 */

/** One photo: a phone's full-size JPEG is 3 to 5 MB, so 10 MB takes any ordinary photo. */
export const MAX_PHOTO_BYTES = 10 * 1024 * 1024;
export const MAX_PHOTO_MEGABYTES = MAX_PHOTO_BYTES / (1024 * 1024);
/** One upload request: a phone's share sheet sends a few at once. */
export const MAX_PHOTOS_PER_UPLOAD = 6;
/** The whole body of one upload: that many full-size photos and 1 MB for the multipart framing. */
export const MAX_PHOTO_UPLOAD_BYTES = MAX_PHOTO_BYTES * MAX_PHOTOS_PER_UPLOAD + 1024 * 1024;
/**
 * A drop log's photos, all its versions' together. A hand-in shows the set-up in a handful of photos
 * (column, sphere, thermometer, stopwatch); 20 leave room for several versions, and keep the evidence
 * of one hand-in something a TA can look through at the marking desk.
 */
export const MAX_PHOTOS_PER_DROP_LOG = 20;
/**
 * What one student may store in one course, every lab together: about forty phone photos. It bounds
 * the disk a class can fill (300 students × 200 MB = 60 GB at most).
 */
export const MAX_PHOTO_BYTES_PER_STUDENT = 200 * 1024 * 1024;
