import { fileTypeFromBuffer } from 'file-type';
import sharp, { type Metadata, type OutputInfo } from 'sharp';
import exifReader from 'exif-reader';
import { TICKET_FILE_TYPES, type TicketFileType } from '../../shared/contracts/tickets';
import { AppError } from '../errors/app-error';
import { instantOfWallTime } from './local-time';

/** A file that passed the checks, as it is to be stored. */
export interface CheckedFile {
  contentType: TicketFileType;
  extension: 'jpg' | 'png' | 'webp' | 'pdf';
  /** The bytes to store: a photo re-encoded upright without metadata; a PDF as uploaded. */
  bytes: Buffer;
  /** 320 px WebP of a photo; null for a PDF. */
  thumb: Buffer | null;
  widthPx: number | null;
  heightPx: number | null;
  /** What the camera recorded before its metadata was stripped. */
  takenAt: Date | null;
  latitudeDeg: number | null;
  longitudeDeg: number | null;
}

/** Longest side of a thumbnail [px]. */
export const THUMB_PX = 320;
/** Largest photo decoded [pixels]: a 10 MB file can still unpack to gigabytes (a "decompression bomb"). */
export const MAX_PIXELS = 100_000_000;

const ACCEPTED_WORDS = 'JPEG, PNG or WebP photos and PDF documents';
const EXTENSION: Record<TicketFileType, CheckedFile['extension']> = {
  'image/jpeg': 'jpg',
  'image/png': 'png',
  'image/webp': 'webp',
  'application/pdf': 'pdf',
};

export const notAccepted = (what: string) =>
  new AppError(400, 'file_type_not_accepted', `${what} is not a file a ticket accepts: send ${ACCEPTED_WORDS}.`, {
    file: `Accepted by content: ${TICKET_FILE_TYPES.join(', ')}.`,
  });
const damaged = (kind: string, why: string) =>
  new AppError(400, 'file_damaged', `The ${kind} could not be read to its end (${why}): it may be cut short; send it again.`, {
    file: 'Damaged or incomplete.',
  });

/**
 * Checks an upload by its content, never its name or the type the browser claims: the magic bytes (file-type) must
 * say JPEG, PNG, WebP or PDF. A photo is then decoded in full with sharp (a truncated one fails there), stored
 * re-encoded in its own format, turned upright by its orientation tag and without any metadata (camera serials, GPS
 * and the like do not travel with the file); the time and place it was taken are read first and returned, to be kept
 * as columns. A PDF must end with `%%EOF` within its last 1024 bytes (common practice: readers look there) and is kept
 * as uploaded.
 *
 * @param siteTimeZone the zone a camera's clock is taken to show when its photo records no UTC offset
 */
export async function checkUpload(original: Buffer, siteTimeZone: string, now: number): Promise<CheckedFile> {
  const detected = await fileTypeFromBuffer(original);
  const type = TICKET_FILE_TYPES.find((t) => t === detected?.mime);
  if (!type) {
    const name = detected?.ext.toUpperCase();
    throw notAccepted(name ? `${/^[AEFHILMNORSX]/.test(name) ? 'An' : 'A'} ${name} file (${detected!.mime})` : 'This file');
  }
  if (type === 'application/pdf') {
    const tail = original.subarray(Math.max(0, original.length - 1024)).toString('latin1');
    if (!tail.includes('%%EOF')) throw damaged('PDF', 'no %%EOF marker at its end');
    return {
      contentType: type,
      extension: 'pdf',
      bytes: original,
      thumb: null,
      widthPx: null,
      heightPx: null,
      takenAt: null,
      latitudeDeg: null,
      longitudeDeg: null,
    };
  }
  const kind = EXTENSION[type].toUpperCase();
  const input = () => sharp(original, { failOn: 'truncated', limitInputPixels: MAX_PIXELS }).autoOrient();
  let meta: Metadata;
  try {
    meta = await sharp(original, { limitInputPixels: MAX_PIXELS }).metadata();
  } catch (err) {
    throw damaged(`${kind} photo`, (err as Error).message);
  }
  if ((meta.width ?? 0) * (meta.height ?? 0) > MAX_PIXELS)
    throw new AppError(
      400,
      'file_too_many_pixels',
      `The photo has ${meta.width} × ${meta.height} pixels; at most 100 million are accepted.`,
      {
        file: 'Too many pixels.',
      },
    );
  const encoded = input();
  if (type === 'image/jpeg') encoded.jpeg({ quality: 90 });
  else if (type === 'image/png') encoded.png();
  else encoded.webp({ quality: 90 });
  let stored: { data: Buffer; info: OutputInfo };
  let thumb: Buffer;
  try {
    [stored, thumb] = await Promise.all([
      encoded.toBuffer({ resolveWithObject: true }),
      input().resize(THUMB_PX, THUMB_PX, { fit: 'inside', withoutEnlargement: true }).webp({ quality: 75 }).toBuffer(),
    ]);
  } catch (err) {
    throw damaged(`${kind} photo`, (err as Error).message.split('\n')[0]!);
  }
  return {
    contentType: type,
    extension: EXTENSION[type],
    bytes: stored.data,
    thumb,
    widthPx: stored.info.width,
    heightPx: stored.info.height,
    ...whenAndWhere(meta.exif, siteTimeZone, now),
  };
}

type Exif = ReturnType<typeof exifReader>;

/**
 * When and where the camera says a photo was taken (EXIF 2.32 tags): DateTimeOriginal with OffsetTimeOriginal; else
 * the GPS receiver's UTC date and time; else DateTimeOriginal read in the site's zone. GPS latitude and longitude in
 * degrees, minutes, seconds with their N/S, E/W refs. Values out of range, 0°/0° (a phone without a fix) and times
 * before 2000 or after now are dropped.
 */
export function whenAndWhere(
  raw: Buffer | undefined,
  siteTimeZone: string,
  now: number,
): Pick<CheckedFile, 'takenAt' | 'latitudeDeg' | 'longitudeDeg'> {
  const none = { takenAt: null, latitudeDeg: null, longitudeDeg: null };
  if (!raw) return none;
  let exif: Exif;
  try {
    exif = exifReader(raw);
  } catch {
    return none;
  }
  const gps = exif.GPSInfo;
  const deg = (dms: unknown, ref: unknown, max: number, negative: string) => {
    if (!Array.isArray(dms) || dms.length !== 3 || !dms.every((x) => typeof x === 'number' && Number.isFinite(x))) return null;
    const v = (dms[0] + dms[1] / 60 + dms[2] / 3600) * (ref === negative ? -1 : 1);
    return Math.abs(v) <= max ? Math.round(v * 1e7) / 1e7 : null;
  };
  let lat = deg(gps?.GPSLatitude, gps?.GPSLatitudeRef, 90, 'S');
  let lon = deg(gps?.GPSLongitude, gps?.GPSLongitudeRef, 180, 'W');
  if (lat === null || lon === null || (lat === 0 && lon === 0)) lat = lon = null;

  const photo = exif.Photo;
  const original = photo?.DateTimeOriginal instanceof Date ? photo.DateTimeOriginal.getTime() : NaN;
  const offset = typeof photo?.OffsetTimeOriginal === 'string' ? /^([+-])(\d{2}):(\d{2})$/.exec(photo.OffsetTimeOriginal) : null;
  let taken: number | null = null;
  if (Number.isFinite(original) && offset) {
    taken = original - (offset[1] === '-' ? -1 : 1) * (Number(offset[2]) * 60 + Number(offset[3])) * 60_000;
  } else if (gps?.GPSDateStamp && Array.isArray(gps.GPSTimeStamp) && gps.GPSTimeStamp.length === 3) {
    const [h, m, s] = gps.GPSTimeStamp as number[];
    const day = Date.parse(`${String(gps.GPSDateStamp).replace(/:/g, '-')}T00:00:00Z`);
    taken = day + ((h! * 60 + m!) * 60 + s!) * 1000;
  } else if (Number.isFinite(original)) {
    taken = instantOfWallTime(original, siteTimeZone);
  }
  if (taken === null || !Number.isFinite(taken) || taken < Date.UTC(2000, 0, 1) || taken > now + 86_400_000) taken = null;
  return { takenAt: taken === null ? null : new Date(taken), latitudeDeg: lat, longitudeDeg: lon };
}
