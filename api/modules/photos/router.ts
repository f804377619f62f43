import { pipeline } from 'node:stream/promises';
import { Router, type Request, type RequestHandler, type Response } from 'express';
import multer from 'multer';
import { z } from 'zod';
import { PHOTO_FIELD } from '../../contracts/photos';
import { allow, ANY_ROLE } from '../../lib/access';
import { AppError } from '../../lib/errors';
import { validate, validated } from '../../lib/validate';
import { TAKES_PHOTOS } from './policy';
import type { PhotoService, RenditionName } from './service';

const idParams = z.object({ id: z.uuid({ error: 'A photo id is a UUID.' }) });
type IdParams = z.infer<typeof idParams>;

/** Renditions never change under an id, so browsers may keep them a day (privately: they are behind sign-in). */
const RENDITION_CACHE = 'private, max-age=86400';
/** Room for the multipart envelope around the file itself. */
const ENVELOPE_BYTES = 64 * 1024;

const megabytes = (n: number) => (n / (1024 * 1024)).toLocaleString('en-GB', { maximumFractionDigits: 1 });

function tooLarge(maxBytes: number) {
  return new AppError(
    413,
    'photo-too-large',
    'This photo file is too large',
    `The most Setwright takes is ${megabytes(maxBytes)} MB a photo. Use the tablet camera's normal photo size.`,
    [{ pointer: '#/photo', detail: `The file is larger than ${megabytes(maxBytes)} MB.` }],
    { maxBytes },
  );
}

const fieldProblem = (detail: string) =>
  AppError.badRequest(detail, [{ pointer: `#/${PHOTO_FIELD}`, detail: 'Choose or take one photo to upload.' }]);

/**
 * Multipart reading with multer, in memory and within limits: one file in the `photo`
 * field and nothing much else. Its failures become problems here.
 */
function receivePhoto(maxBytes: number): RequestHandler {
  const upload = multer({
    storage: multer.memoryStorage(),
    limits: { fileSize: maxBytes, files: 1, fields: 10, parts: 11, fieldNameSize: 100, fieldSize: 10_000, headerPairs: 100 },
  }).single(PHOTO_FIELD);
  return (req, res, next) => {
    // Refuse at once what is bound to be too large, before reading any of it.
    const declared = Number(req.headers['content-length']);
    if (Number.isFinite(declared) && declared > maxBytes + ENVELOPE_BYTES) {
      res.set('Connection', 'close');
      next(tooLarge(maxBytes));
      return;
    }
    upload(req, res, (err: unknown) => {
      if (!err) return next();
      if (err instanceof multer.MulterError) {
        switch (err.code) {
          case 'LIMIT_FILE_SIZE':
            return next(tooLarge(maxBytes));
          case 'LIMIT_UNEXPECTED_FILE':
          case 'LIMIT_FILE_COUNT':
            return next(fieldProblem(`Send one photo, as the form field "${PHOTO_FIELD}".`));
          default:
            return next(AppError.badRequest(`The upload form is not right (${err.message.toLowerCase()}). Send one photo, as the form field "${PHOTO_FIELD}".`));
        }
      }
      // busboy's own failures: a cut-off or malformed multipart body.
      next(AppError.badRequest('The upload could not be read: the form data is malformed or was cut off. Try again.'));
    });
  };
}

/** Photo evidence: upload, look at, and remove. Every route needs a signed-in person (app.ts) and declares its roles. */
export function photosRouter(photos: PhotoService, config: { PHOTO_MAX_BYTES: number }): Router {
  const router = Router();

  router.post('/', allow(...TAKES_PHOTOS), receivePhoto(config.PHOTO_MAX_BYTES), async (req, res) => {
    if (!req.file) throw fieldProblem(`There is no photo in the upload. Send it as the form field "${PHOTO_FIELD}".`);
    const photo = await photos.ingest(req.user!, req.file.buffer);
    res.status(201).location(`/api/photos/${photo.id}`).json(photo);
  });

  router.get('/:id', allow(...ANY_ROLE), validate({ params: idParams }), async (req, res) => {
    const { id } = validated<IdParams>(res, 'params');
    res.json(await photos.describe(req.user!, id));
  });

  const rendition = (which: RenditionName) => async (req: Request, res: Response) => {
    const { id } = validated<IdParams>(res, 'params');
    const photo = await photos.visible(req.user!, id);
    const headers = {
      ETag: photos.etagOf(photo, which),
      'Cache-Control': RENDITION_CACHE,
      'X-Content-Type-Options': 'nosniff',
      'Content-Disposition': `inline; filename="photo-${photo.id}-${which}.jpg"`,
    };
    res.set('ETag', headers.ETag);
    if (req.fresh) {
      res.set(headers).status(304).end();
      return;
    }
    // Only a rendition that is really there gets the caching headers (never a problem).
    res.removeHeader('ETag');
    const object = await photos.open(photo, which);
    res.set(headers).status(200).type('image/jpeg');
    if (object.contentLength !== undefined) res.set('Content-Length', String(object.contentLength));
    try {
      await pipeline(object.body, res);
    } catch (err) {
      // The reader went away, or the store stopped half-way: the status line has gone, so just log it.
      req.log.warn({ err, photo: photo.id }, 'a photo stream ended early');
    }
  };
  router.get('/:id/display', allow(...ANY_ROLE), validate({ params: idParams }), rendition('display'));
  router.get('/:id/thumb', allow(...ANY_ROLE), validate({ params: idParams }), rendition('thumb'));

  router.delete('/:id', allow(...TAKES_PHOTOS), validate({ params: idParams }), async (req, res) => {
    const { id } = validated<IdParams>(res, 'params');
    await photos.remove(req.user!, id);
    res.status(204).end();
  });

  return router;
}
