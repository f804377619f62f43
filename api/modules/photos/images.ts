import sharp, { type SharpOptions } from 'sharp';
import { AppError } from '../../lib/errors';

export type PhotoFormat = 'jpeg' | 'png' | 'webp';

export const DISPLAY_LONGEST_SIDE = 1600;
export const THUMB_LONGEST_SIDE = 320;
const DISPLAY_QUALITY = 82;
const THUMB_QUALITY = 76;

// Every upload is a new picture: libvips' operation cache would only hold memory.
sharp.cache(false);

const MIME: Record<PhotoFormat, string> = { jpeg: 'image/jpeg', png: 'image/png', webp: 'image/webp' };

export interface Inspected {
  format: PhotoFormat;
  type: string;
  /** Upright dimensions: after the EXIF orientation is applied. */
  width: number;
  height: number;
}

export interface Rendition {
  data: Buffer;
  width: number;
  height: number;
}

const notAPhoto = () =>
  new AppError(
    415,
    'not-a-photo',
    'This file is not a photo',
    'Setwright takes JPEG, PNG and WebP photos. This file is something else, whatever its name says. Take the photo again with the camera button.',
    [{ pointer: '#/photo', detail: 'This file is not a JPEG, PNG or WebP photo.' }],
  );

const unreadable = () =>
  new AppError(
    422,
    'unreadable-photo',
    'This photo cannot be read',
    'The file starts like a photo but cannot be read to the end: it is damaged or incomplete. Take the photo again.',
    [{ pointer: '#/photo', detail: 'The photo is damaged or incomplete.' }],
  );

const megapixels = (px: number) => (px / 1_000_000).toLocaleString('en-GB', { maximumFractionDigits: 1 });

/** What the first bytes say the file is: the three formats we take, or nothing. */
export function sniffFormat(bytes: Buffer): PhotoFormat | null {
  if (bytes.length >= 3 && bytes[0] === 0xff && bytes[1] === 0xd8 && bytes[2] === 0xff) return 'jpeg';
  if (bytes.length >= 8 && bytes.subarray(0, 8).equals(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]))) return 'png';
  if (bytes.length >= 12 && bytes.toString('latin1', 0, 4) === 'RIFF' && bytes.toString('latin1', 8, 12) === 'WEBP') return 'webp';
  return null;
}

function options(maxPixels: number): SharpOptions {
  // 'error' refuses damaged and truncated files but lets through the harmless warnings some cameras cause.
  return { limitInputPixels: maxPixels, failOn: 'error' };
}

/**
 * Read only the header: prove the file is a JPEG, PNG or WebP by its content, and refuse
 * anything above the pixel limit before any pixel is decoded (decompression bombs).
 */
export async function inspectPhoto(bytes: Buffer, maxPixels: number): Promise<Inspected> {
  const sniffed = sniffFormat(bytes);
  if (!sniffed) throw notAPhoto();
  let meta: sharp.Metadata;
  try {
    // Header only, no pixels decoded; our own limit below gives the clearer answer.
    meta = await sharp(bytes, { limitInputPixels: false }).metadata();
  } catch {
    throw unreadable();
  }
  if (meta.format !== sniffed) throw notAPhoto();
  const { width, height } = meta.autoOrient ?? meta;
  if (!width || !height) throw unreadable();
  if (width * height > maxPixels) {
    throw new AppError(
      422,
      'photo-too-many-pixels',
      'This photo has too many pixels',
      `The photo is ${width} × ${height} pixels (${megapixels(width * height)} megapixels); Setwright takes up to ${megapixels(maxPixels)} megapixels. Use the tablet camera's normal photo size.`,
      [{ pointer: '#/photo', detail: 'The photo is larger than Setwright takes.' }],
      { width, height, maxPixels },
    );
  }
  return { format: sniffed, type: MIME[sniffed], width, height };
}

function toJpeg(image: sharp.Sharp, side: number, quality: number): Promise<Rendition> {
  return image
    .resize({ width: side, height: side, fit: 'inside', withoutEnlargement: true })
    .jpeg({ quality, chromaSubsampling: '4:2:0' })
    .toBuffer({ resolveWithObject: true })
    .then(({ data, info }) => ({ data, width: info.width, height: info.height }));
}

/**
 * The display rendition: decode the upload, turn it upright by its EXIF orientation, drop
 * every piece of metadata (sharp writes none unless asked: no EXIF, GPS, XMP, IPTC or ICC),
 * and write a baseline JPEG of at most 1600 px a side (never enlarged).
 */
export async function renderDisplay(bytes: Buffer, maxPixels: number): Promise<Rendition> {
  try {
    return await toJpeg(sharp(bytes, options(maxPixels)).rotate().flatten({ background: '#ffffff' }), DISPLAY_LONGEST_SIDE, DISPLAY_QUALITY);
  } catch {
    throw unreadable();
  }
}

/** The thumbnail, made from the display rendition: far quicker and lighter than decoding the upload again. */
export async function renderThumb(display: Rendition): Promise<Rendition> {
  return toJpeg(sharp(display.data), THUMB_LONGEST_SIDE, THUMB_QUALITY);
}
