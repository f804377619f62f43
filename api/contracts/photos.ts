/** The multipart form field that carries the photo. */
export const PHOTO_FIELD = 'photo';

/** What the API accepts, judged by the file's content (never its name or declared type). */
export const PHOTO_INPUT_TYPES = ['image/jpeg', 'image/png', 'image/webp'] as const;

/** One stored rendition of a photo; both are JPEG without any metadata. */
export interface PhotoRendition {
  url: string;
  type: 'image/jpeg';
  width: number;
  height: number;
  bytes: number;
  /** SHA-256 of the stored bytes; also the rendition's ETag. */
  sha256: string;
}

/** A photo as the API describes it (POST /api/photos and GET /api/photos/:id). */
export interface PhotoView {
  id: string;
  ownerId: string;
  createdAt: string;
  /** The uploaded file: its type, size and upright dimensions, and a SHA-256 of its exact bytes. It is not kept. */
  original: { type: string; bytes: number; width: number; height: number; sha256: string };
  /** Longest side at most 1600 px, for viewing and for the record's PDF. */
  display: PhotoRendition;
  /** Longest side at most 320 px, for lists and previews. */
  thumb: PhotoRendition;
  attachedRecordId: string | null;
  attachedAt: string | null;
}
