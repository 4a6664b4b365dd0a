import { randomUUID } from 'node:crypto';
import sharp, { type Metadata } from 'sharp';
import { In, type EntityManager } from 'typeorm';
import type { FieldError } from '../../shared/schemas/errors.js';
import type { AppContext } from '../context.js';
import { Upload, type UploadOwnerKind } from '../entities/Upload.js';
import { User } from '../entities/User.js';
import { badRequest, HttpError } from '../errors.js';
import { newStoredName, type StoredExtension } from '../storage/index.js';

/** The largest photo accepted, in bytes (the route's multer limit uses the same number). */
export const MAX_UPLOAD_BYTES = 10 * 1024 * 1024;
/** Longest side of a thumbnail, in pixels. */
export const THUMBNAIL_MAX_PX = 320;
// A 10 MB PNG of one colour can claim billions of pixels; decoding it would exhaust memory.
// 100 megapixels is above any phone or site camera's normal output.
const MAX_PIXELS = 100_000_000;

const formats = {
  jpeg: { mimeType: 'image/jpeg', extension: 'jpg' },
  png: { mimeType: 'image/png', extension: 'png' },
  webp: { mimeType: 'image/webp', extension: 'webp' },
} as const satisfies Record<string, { mimeType: Upload['mimeType']; extension: StoredExtension }>;
type PhotoFormat = keyof typeof formats;

const unsupported = () =>
  new HttpError(415, 'unsupported_image', 'That file is not a JPEG, PNG or WebP photo. Take or choose a photo and try again.');

/**
 * The format the first bytes announce (JPEG SOI marker FF D8 FF; the PNG signature 89 50 4E 47
 * 0D 0A 1A 0A; a RIFF container of type WEBP), or null. Checked before the image library sees
 * the bytes, so SVG, HTML, PDF or any other format its loaders know never reaches a parser.
 */
export function sniffFormat(bytes: Buffer): PhotoFormat | null {
  if (bytes.length >= 3 && bytes[0] === 0xff && bytes[1] === 0xd8 && bytes[2] === 0xff) return 'jpeg';
  if (bytes.length >= 8 && bytes.subarray(0, 8).equals(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]))) return 'png';
  if (bytes.length >= 12 && bytes.toString('latin1', 0, 4) === 'RIFF' && bytes.toString('latin1', 8, 12) === 'WEBP') return 'webp';
  return null;
}

// What a file's name or declared type may say about a photo we take.
const photoExtensions = new Map<string, PhotoFormat>([['jpg', 'jpeg'], ['jpeg', 'jpeg'], ['jpe', 'jpeg'], ['jfif', 'jpeg'], ['png', 'png'], ['webp', 'webp']]);
// Names that announce something other than a photo we take (a script-carrying SVG above all).
const otherExtensions = new Set(['svg', 'svgz', 'gif', 'tif', 'tiff', 'bmp', 'heic', 'heif', 'avif', 'pdf', 'html', 'htm', 'xhtml', 'xml', 'js', 'mjs', 'exe']);
const declaredTypes = new Map<string, PhotoFormat>([['image/jpeg', 'jpeg'], ['image/jpg', 'jpeg'], ['image/pjpeg', 'jpeg'], ['image/png', 'png'], ['image/webp', 'webp']]);
const formatWords: Record<PhotoFormat, string> = { jpeg: 'a JPEG', png: 'a PNG', webp: 'a WebP' };

/**
 * Refuses a file whose name or declared type says something other than what its bytes are (a PNG
 * named .jpg, a photo named .svg, a part sent as image/svg+xml). A name without a known
 * extension, and an undeclared or generic type, are judged by the content alone.
 */
function assertNameAgrees(content: PhotoFormat, originalName: string | undefined, declaredType: string | undefined): void {
  const extension = /\.([A-Za-z0-9]{1,5})$/.exec(originalName ?? '')?.[1]?.toLowerCase();
  const fix = 'Choose the photo itself, as the camera saved it, and try again.';
  if (extension && otherExtensions.has(extension)) {
    throw new HttpError(415, 'unsupported_image', `The file is named as a .${extension} file: Holdline takes JPEG, PNG and WebP photos only. ${fix}`);
  }
  const named = extension ? photoExtensions.get(extension) : undefined;
  if (named && named !== content) {
    throw new HttpError(415, 'image_mismatch', `The file is named .${extension} but holds ${formatWords[content]} image. ${fix}`);
  }
  const declared = (declaredType ?? '').split(';')[0]!.trim().toLowerCase();
  if (declared === '' || declared === 'application/octet-stream') return;
  if (declaredTypes.get(declared) !== content) {
    throw new HttpError(415, 'image_mismatch', `The file was sent as another kind of file than the ${formatWords[content].slice(2)} image it holds. ${fix}`);
  }
}

/** The bytes of an uploaded file; its client-side name is never stored nor used for a path, only compared with the content. */
export interface IncomingFile {
  buffer: Buffer;
  /** The name the device gave the file, if any: its extension must agree with the content. */
  originalName?: string;
  /** The type the form part declared, if any: it must agree with the content. */
  declaredType?: string;
}

/**
 * Checks a photo by its content, makes a thumbnail, writes both through storage and records the
 * upload, unattached, for the actor. Anything refused or failed leaves no file and no row.
 */
export async function storeUpload(context: AppContext, actor: User, file: IncomingFile): Promise<Upload> {
  const bytes = file.buffer;
  if (bytes.length > MAX_UPLOAD_BYTES) throw new HttpError(413, 'too_large', 'Photos can be at most 10 MB.');
  const sniffed = sniffFormat(bytes);
  if (!sniffed) throw unsupported();
  assertNameAgrees(sniffed, file.originalName, file.declaredType);

  let metadata: Metadata;
  try {
    // Only the header is read here (no limit, so a huge declared size is answered by our check
    // below as too large, not as an unreadable file); the decoding below is limited.
    metadata = await sharp(bytes, { limitInputPixels: false }).metadata();
  } catch {
    throw unsupported();
  }
  // The library must read the same format the first bytes announced.
  if (metadata.format !== sniffed) throw unsupported();
  const format = formats[sniffed];
  // Reading the header decodes nothing: a few hundred bytes can declare billions of pixels.
  if (!(metadata.width > 0 && metadata.height > 0) || metadata.width * metadata.height > MAX_PIXELS) {
    throw new HttpError(413, 'too_large', 'Photos can be at most 100 megapixels. Use the camera’s normal size and try again.');
  }

  let thumbnail: Buffer;
  try {
    // rotate() applies the EXIF orientation, so thumbnails stand the way the photo was taken;
    // 'truncated' refuses half-sent files but tolerates the small warnings some cameras cause.
    thumbnail = await sharp(bytes, { failOn: 'truncated', limitInputPixels: MAX_PIXELS })
      .rotate()
      .resize(THUMBNAIL_MAX_PX, THUMBNAIL_MAX_PX, { fit: 'inside', withoutEnlargement: true })
      .webp({ quality: 75 })
      .toBuffer();
  } catch {
    throw new HttpError(415, 'unsupported_image', 'That photo could not be read; it may be damaged or incomplete. Take it again and retry.');
  }

  // The original is kept byte for byte (it is the record); browsers apply its EXIF orientation.
  const storedName = newStoredName(format.extension);
  const thumbnailName = newStoredName('webp');
  const written: string[] = [];
  try {
    await putTracked(context, storedName, bytes, written);
    await putTracked(context, thumbnailName, thumbnail, written);
    return await context.queue.transaction((manager) =>
      manager.save(
        manager.create(Upload, {
          id: randomUUID(),
          storedName,
          thumbnailName,
          mimeType: format.mimeType,
          sizeBytes: bytes.length,
          widthPx: metadata.autoOrient.width,
          heightPx: metadata.autoOrient.height,
          uploadedBy: actor.id,
          createdAt: context.now().toISOString(),
          ownerKind: null,
          ownerId: null,
        }),
      ),
    );
  } catch (err) {
    await Promise.all(
      written.map((name) =>
        context.storage.remove(name).catch((removeErr: unknown) => context.logger.error({ err: removeErr, name }, 'could not remove a file after a failed upload')),
      ),
    );
    throw err;
  }
}

/** Writes a file and remembers its name for cleanup, including a half-written one. */
async function putTracked(context: AppContext, name: string, bytes: Buffer, written: string[]): Promise<void> {
  try {
    await context.storage.put(name, bytes);
    written.push(name);
  } catch (err) {
    // EEXIST means the name belongs to another file (put never overwrites): not ours to remove.
    if ((err as NodeJS.ErrnoException | null)?.code !== 'EEXIST') written.push(name);
    throw err;
  }
}

/**
 * Attaches uploads to a record inside the caller's transaction. Each id must exist, have been
 * uploaded by the actor (or the actor is an admin) and belong to no record yet: a photo is the
 * evidence of one step, hold, defect or inspection only. On the board the owner is the job, so
 * "already attached" is refused even for the same job (the same photo must not stand for two
 * steps or defects). Otherwise it throws naming every failing `photoIds.N` (or the one-photo
 * field, `photoId`): 409
 * `photo_already_used` when reuse is the only problem, else 400. Returns the uploads in the order given.
 */
export async function attachUploads(
  manager: EntityManager,
  uploadIds: readonly string[],
  ownerKind: UploadOwnerKind,
  ownerId: string,
  actorId: string,
  field = 'photoIds',
): Promise<Upload[]> {
  if (uploadIds.length === 0) return [];
  const actor = await manager.findOneBy(User, { id: actorId });
  const isAdmin = actor?.isAdmin === true && actor.active;
  const found = new Map((await manager.findBy(Upload, { id: In([...new Set(uploadIds)]) })).map((u) => [u.id, u]));

  const fields: FieldError[] = [];
  let reused = 0;
  const seen = new Set<string>();
  uploadIds.forEach((id, index) => {
    // A list field names each entry (`photoIds.1`); a one-photo field (`photoId`) names itself,
    // so the form shows the message beside its photo.
    const path = field.endsWith('Ids') ? `${field}.${index}` : field;
    const upload = found.get(id);
    if (seen.has(id)) fields.push({ path, message: 'This photo is listed twice.' });
    else if (!upload) fields.push({ path, message: 'That photo was not found. Upload it again.' });
    else if (upload.uploadedBy !== actorId && !isAdmin) fields.push({ path, message: 'That photo was uploaded by someone else. Upload your own photo.' });
    else if (upload.ownerKind !== null) {
      reused += 1;
      fields.push({ path, message: `That photo is already the evidence for ${ownerWords[upload.ownerKind]}. Each record needs its own photo: take a new one.` });
    }
    seen.add(id);
  });
  if (fields.length > 0 && reused === fields.length) {
    throw new HttpError(409, 'photo_already_used', 'That photo is already the evidence for another record. Take a new photo for this one.', fields);
  }
  if (fields.length > 0) throw badRequest('Some photos cannot be attached.', fields);

  const uploads = uploadIds.map((id) => found.get(id)!);
  for (const upload of uploads) {
    upload.ownerKind = ownerKind;
    upload.ownerId = ownerId;
  }
  await manager.save(uploads);
  return uploads;
}

const ownerWords: Record<UploadOwnerKind, string> = {
  inspection: 'an inspection',
  step: 'a step',
  hold: 'a hold’s acknowledgment',
  defect: 'a defect report',
};
