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

const unsupported = () =>
  new HttpError(415, 'unsupported_image', 'That file is not a JPEG, PNG or WebP photo. Take or choose a photo and try again.');

/** The bytes of an uploaded file; its client-side name is deliberately not used. */
export interface IncomingFile {
  buffer: Buffer;
}

/**
 * Checks a photo by its content, makes a thumbnail, writes both through storage and records the
 * upload, unattached, for the actor. Anything refused or failed leaves no file and no row.
 */
export async function storeUpload(context: AppContext, actor: User, file: IncomingFile): Promise<Upload> {
  const bytes = file.buffer;
  if (bytes.length > MAX_UPLOAD_BYTES) throw new HttpError(413, 'too_large', 'Photos can be at most 10 MB.');

  let metadata: Metadata;
  try {
    metadata = await sharp(bytes).metadata();
  } catch {
    throw unsupported();
  }
  const format = metadata.format in formats ? formats[metadata.format as keyof typeof formats] : null;
  if (!format) throw unsupported();
  if (metadata.width * metadata.height > MAX_PIXELS) {
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
 * uploaded by the actor (or the actor is an admin) and not belong to another record yet;
 * otherwise a 400 names every failing `photoIds.N`. Returns the uploads in the order given.
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
  const seen = new Set<string>();
  uploadIds.forEach((id, index) => {
    const path = `${field}.${index}`;
    const upload = found.get(id);
    if (seen.has(id)) fields.push({ path, message: 'This photo is listed twice.' });
    else if (!upload) fields.push({ path, message: 'That photo was not found. Upload it again.' });
    else if (upload.uploadedBy !== actorId && !isAdmin) fields.push({ path, message: 'That photo was uploaded by someone else. Upload your own photo.' });
    else if (upload.ownerKind !== null && (upload.ownerKind !== ownerKind || upload.ownerId !== ownerId)) {
      fields.push({ path, message: 'That photo already belongs to another record. Upload it again to use it here.' });
    }
    seen.add(id);
  });
  if (fields.length > 0) throw badRequest('Some photos cannot be attached.', fields);

  const uploads = uploadIds.map((id) => found.get(id)!);
  for (const upload of uploads) {
    upload.ownerKind = ownerKind;
    upload.ownerId = ownerId;
  }
  await manager.save(uploads);
  return uploads;
}
