import { createHash, randomUUID } from 'node:crypto';
import type { Logger } from 'pino';
import type { PhotoView } from '../../contracts/photos';
import { AppError } from '../../lib/errors';
import type { ObjectStream, ObjectStore } from '../../lib/object-store';
import type { Person } from '../people/repository';
import { inspectPhoto, renderDisplay, renderThumb, type Rendition } from './images';
import { canSeePhoto } from './policy';
import { deleteUnattachedPhoto, findPhoto, insertPhoto, type PhotoRecord } from './repository';

export type RenditionName = 'display' | 'thumb';

const JPEG = 'image/jpeg';
const sha256 = (bytes: Buffer) => createHash('sha256').update(bytes).digest('hex');
/** true when the promise fulfilled, else its error; never rejects, so it may wait unwatched. */
const settled = (p: Promise<unknown>): Promise<true | unknown> => p.then(() => true as const, (err: unknown) => err ?? new Error('failed'));

const storeDown = () =>
  new AppError(
    503,
    'photo-store-unavailable',
    'Photos cannot be stored right now',
    'The photo store did not answer. Nothing was saved; try again in a minute, and tell the workshop admin if it keeps happening.',
  );

/** How the API shows a photo row. */
export function toView(p: PhotoRecord): PhotoView {
  const base = `/api/photos/${p.id}`;
  return {
    id: p.id,
    ownerId: p.ownerId,
    createdAt: p.createdAt.toISOString(),
    original: { type: p.originalType, bytes: p.originalBytes, width: p.originalWidth, height: p.originalHeight, sha256: p.sha256 },
    display: { url: `${base}/display`, type: JPEG, width: p.displayWidth, height: p.displayHeight, bytes: p.displayBytes, sha256: p.displaySha256 },
    thumb: { url: `${base}/thumb`, type: JPEG, width: p.thumbWidth, height: p.thumbHeight, bytes: p.thumbBytes, sha256: p.thumbSha256 },
    attachedRecordId: p.attachedRecordId,
    attachedAt: p.attachedAt ? p.attachedAt.toISOString() : null,
  };
}

/**
 * Photo evidence: check and process an upload, keep its renditions in the object store and
 * its row in the database, and hand them back only to people allowed to see them.
 * Nothing is stored until the photo has passed every check; a failure half-way removes
 * whatever was already written.
 */
export class PhotoService {
  constructor(
    private readonly store: ObjectStore,
    private readonly maxPixels: number,
    private readonly logger: Logger,
  ) {}

  async ingest(owner: Person, bytes: Buffer): Promise<PhotoView> {
    if (bytes.length === 0) {
      throw AppError.badRequest('The photo file is empty (0 bytes). Take the photo again.', [
        { pointer: '#/photo', detail: 'The file is empty.' },
      ]);
    }
    const original = await inspectPhoto(bytes, this.maxPixels);
    const rendering = renderDisplay(bytes, this.maxPixels);
    const originalSha256 = sha256(bytes); // on this thread while sharp works on its own
    const display = await rendering;

    // Keys are ours alone: nothing from the client's file name or fields goes into them.
    const id = randomUUID();
    const displayKey = `photos/${id}/display.jpg`;
    const thumbKey = `photos/${id}/thumb.jpg`;
    const displaySha256 = sha256(display.data);
    // The display rendition travels to the store while the thumbnail is made.
    const putDisplay = settled(this.store.put(displayKey, display.data, JPEG, { sha256: displaySha256, photo: id }));
    let thumb: Rendition;
    try {
      thumb = await renderThumb(display);
    } catch (err) {
      await putDisplay;
      await this.removeObjects([displayKey]);
      throw err;
    }
    const thumbSha256 = sha256(thumb.data);
    const putThumb = settled(this.store.put(thumbKey, thumb.data, JPEG, { sha256: thumbSha256, photo: id }));

    const failure = (await Promise.all([putDisplay, putThumb])).find((outcome) => outcome !== true);
    if (failure !== undefined) {
      this.logger.error({ err: failure, photo: id }, 'could not store a photo');
      await this.removeObjects([displayKey, thumbKey]);
      throw storeDown();
    }

    try {
      const row = await insertPhoto({
        id,
        ownerId: owner.id,
        originalType: original.type,
        originalBytes: bytes.length,
        originalWidth: original.width,
        originalHeight: original.height,
        sha256: originalSha256,
        contentType: JPEG,
        displayKey,
        displayWidth: display.width,
        displayHeight: display.height,
        displayBytes: display.data.length,
        displaySha256,
        thumbKey,
        thumbWidth: thumb.width,
        thumbHeight: thumb.height,
        thumbBytes: thumb.data.length,
        thumbSha256,
      });
      return toView(row);
    } catch (err) {
      await this.removeObjects([displayKey, thumbKey]);
      throw err;
    }
  }

  /** The photo, if it exists and this person may see it (404 and 403 otherwise). */
  async visible(person: Person, id: string): Promise<PhotoRecord> {
    const photo = await findPhoto(id);
    if (!photo) throw AppError.notFound('There is no photo with that id.');
    if (!canSeePhoto(person, photo)) {
      throw AppError.forbidden('This photo belongs to someone else and is not part of a record you can see.');
    }
    return photo;
  }

  async describe(person: Person, id: string): Promise<PhotoView> {
    return toView(await this.visible(person, id));
  }

  /** The rendition's ETag (its stored bytes' SHA-256) without touching the store. */
  etagOf(photo: PhotoRecord, which: RenditionName): string {
    return `"${which === 'display' ? photo.displaySha256 : photo.thumbSha256}"`;
  }

  async open(photo: PhotoRecord, which: RenditionName): Promise<ObjectStream> {
    const key = which === 'display' ? photo.displayKey : photo.thumbKey;
    let object: ObjectStream | null;
    try {
      object = await this.store.getStream(key);
    } catch (err) {
      this.logger.error({ err, photo: photo.id }, 'could not read a photo from the store');
      throw new AppError(503, 'photo-store-unavailable', 'Photos cannot be shown right now', 'The photo store did not answer. Try again in a minute.');
    }
    if (!object) {
      this.logger.error({ photo: photo.id, key }, 'a photo row has no stored file');
      throw new AppError(500, 'photo-file-missing', 'This photo’s file is missing', 'The photo is on record but its file is not in the photo store. Tell the workshop admin.');
    }
    return object;
  }

  /** Only the uploader, and only while the photo is not part of a record. */
  async remove(person: Person, id: string): Promise<void> {
    const photo = await findPhoto(id);
    if (!photo) throw AppError.notFound('There is no photo with that id.');
    if (photo.ownerId !== person.id) throw AppError.forbidden('Only the person who took a photo can remove it.');
    if (photo.attachedRecordId !== null) {
      throw AppError.conflict('This photo is part of a record, so it stays. Add a note to the record instead.');
    }
    if (!(await deleteUnattachedPhoto(id, person.id))) {
      throw AppError.conflict('This photo changed while you were removing it. Reload and try again.');
    }
    // The row is gone first: a store failure now leaves an orphan file, never a row without its file.
    await this.removeObjects([photo.displayKey, photo.thumbKey]);
  }

  private async removeObjects(keys: string[]): Promise<void> {
    const results = await Promise.allSettled(keys.map((k) => this.store.delete(k)));
    results.forEach((r, i) => {
      if (r.status === 'rejected') this.logger.error({ err: r.reason, key: keys[i] }, 'could not remove a stored photo file');
    });
  }
}
