import { pipeline } from 'node:stream/promises';
import { Router, type Request, type Response } from 'express';
import multer from 'multer';
import { z } from 'zod';
import { checkUploadUrl } from '../auth/upload-urls.js';
import { MAX_UPLOAD_BYTES, storeUpload } from '../commands/uploads.js';
import type { AppContext } from '../context.js';
import { Upload } from '../entities/Upload.js';
import { badRequest, forbidden, HttpError, notFound } from '../errors.js';
import { crewRolesOf } from '../queries/crew.js';
import { authorize, canSeeUpload } from '../policies/index.js';
import { presentUpload } from '../presenters/upload.js';

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
const signedQuerySchema = z.object({ exp: z.string().optional(), sig: z.string().optional() });

const fileField = (message: string) => badRequest(message, [{ path: 'file', message }]);

/** Longest file name accepted, in UTF-8 bytes (what common file systems allow for one name). */
export const MAX_FILE_NAME_BYTES = 255;

/**
 * Why a client's file name is refused, or null. The name never becomes a path (storage makes its
 * own), but a name that carries a folder (`../`, `/etc/`, `C:\`), a control character such as
 * NUL, or more than 255 bytes comes from a crafted request, not a camera: refuse it outright.
 */
export function fileNameProblem(name: string): string | null {
  const fix = 'Rename the photo to a plain name (for example crane-pad.jpg) and try again.';
  if (Buffer.byteLength(name, 'utf8') > MAX_FILE_NAME_BYTES) return `The photo’s file name is longer than ${MAX_FILE_NAME_BYTES} characters. ${fix}`;
  // eslint-disable-next-line no-control-regex
  if (/[\u0000-\u001f\u007f]/.test(name)) return `The photo’s file name contains hidden control characters. ${fix}`;
  if (/[/\\]/.test(name) || /^[A-Za-z]:/.test(name) || name === '.' || name === '..') return `The photo’s file name names a folder, not just a file. ${fix}`;
  return null;
}

// Memory storage: the bytes are checked by content before anything touches the disk, and the
// 10 MB limit bounds what one request can hold. `preservePath` keeps the name as sent, so a
// name with a folder in it is seen and refused instead of silently cut to its last part.
const receivePhoto = multer({
  storage: multer.memoryStorage(),
  preservePath: true,
  limits: { fileSize: MAX_UPLOAD_BYTES, files: 1, fields: 10, parts: 11, fieldNameSize: 100 },
  fileFilter: (_req, file, accept) => {
    const problem = fileNameProblem(file.originalname);
    if (problem) accept(new HttpError(400, 'bad_file_name', problem, [{ path: 'file', message: problem }]));
    else accept(null, true);
  },
}).single('file');

/** multer and busboy errors as our JSON errors. */
function uploadProblem(err: unknown): HttpError {
  if (err instanceof HttpError) return err;
  if (err instanceof multer.MulterError) {
    switch (err.code) {
      case 'LIMIT_FILE_SIZE':
        return new HttpError(413, 'too_large', 'Photos can be at most 10 MB. Choose a smaller photo or take it again at a lower size.');
      case 'LIMIT_UNEXPECTED_FILE':
        return fileField('Send the photo in the form field "file".');
      case 'LIMIT_FILE_COUNT':
        return fileField('Send one photo at a time.');
      default:
        return badRequest('The upload form has too many or too long fields. Send only the photo.');
    }
  }
  // Busboy's own errors: a malformed part header (a raw control character in the file name is
  // one), or a cut-off body.
  if (err instanceof Error && err.message === 'Malformed part header') {
    return new HttpError(400, 'bad_request', 'The upload form could not be read: the photo’s part of it is malformed (for example hidden characters in the file name). Rename the photo to a plain name and try again.');
  }
  return new HttpError(400, 'bad_request', 'The upload could not be read. Check the connection and try again.');
}

/** Runs multer for one request and resolves with the file it read, if any. */
function readPhoto(req: Request, res: Response): Promise<Express.Multer.File | undefined> {
  return new Promise((resolve, reject) => {
    receivePhoto(req, res, (err?: unknown) => (err ? reject(uploadProblem(err)) : resolve(req.file)));
  });
}

/** Photos: upload one (checked by content), and read it or its thumbnail. */
export function uploadsRouter(context: AppContext): Router {
  const router = Router();
  const { manager } = context.dataSource;

  router.post('/uploads', async (req, res) => {
    // Before multer: someone who may not upload is refused before a byte of the photo is read.
    authorize(req.actor ?? null, 'uploads.create', {}, req.authProblem);
    const file = await readPhoto(req, res);
    if (!file) throw fileField('Attach a JPEG, PNG or WebP photo in the form field "file".');
    const upload = await storeUpload(context, req.actor!, { buffer: file.buffer, originalName: file.originalname, declaredType: file.mimetype });
    res.status(201).location(`/api/uploads/${upload.id}`).json(presentUpload(upload, context));
  });

  /**
   * Admits EITHER a valid `exp` + `sig` pair (minted by the presenter for someone who could see
   * the photo then; `<img src>` cannot send a bearer token), OR a bearer token whose person
   * passes `uploads.read` and `canSeeUpload`. A request with neither gets 401.
   */
  async function servePhoto(req: Request, res: Response, variant: 'photo' | 'thumbnail'): Promise<void> {
    const uploadId = String(req.params.uploadId);
    const query = signedQuerySchema.safeParse(req.query);
    const { exp, sig } = query.success ? query.data : {};
    const signedCheck = exp !== undefined || sig !== undefined ? checkUploadUrl(uploadId, exp ?? '', sig ?? '', context.secret, context.now()) : null;
    const bySignature = signedCheck === 'ok';
    if (!bySignature) {
      const actor = req.actor ?? null;
      if (!actor && signedCheck === 'expired') throw new HttpError(401, 'photo_link_expired', 'This photo link has expired. Reload the page to see the photo.');
      if (!actor && signedCheck === 'invalid') throw new HttpError(401, 'photo_link_invalid', 'This photo link is not valid. Reload the page to see the photo.');
      authorize(actor, 'uploads.read', {}, req.authProblem);
    }

    const upload = UUID.test(uploadId) ? await manager.findOneBy(Upload, { id: uploadId.toLowerCase() }) : null;
    if (!upload) throw notFound('That photo');
    const jobRoles = req.actor && upload.ownerId && upload.ownerKind !== 'inspection' && upload.ownerKind !== null ? await crewRolesOf(context.dataSource.manager, upload.ownerId, req.actor.id) : [];
    if (!bySignature && !canSeeUpload(req.actor ?? null, upload, jobRoles)) throw forbidden('You cannot see this photo. It belongs to a record you do not have access to.');

    const stored = await context.storage.get(variant === 'photo' ? upload.storedName : upload.thumbnailName);
    if (!stored) {
      context.logger.error({ uploadId, variant }, 'upload row without its file');
      throw notFound('That photo’s file');
    }
    res.setHeader('Content-Type', variant === 'photo' ? upload.mimeType : 'image/webp');
    res.setHeader('Content-Length', String(stored.sizeBytes));
    res.setHeader('Cache-Control', 'private, max-age=86400');
    // The type is ours, from the content check: browsers must not guess another.
    res.setHeader('X-Content-Type-Options', 'nosniff');
    await pipeline(stored.stream, res);
  }

  router.get('/uploads/:uploadId', (req, res) => servePhoto(req, res, 'photo'));
  router.get('/uploads/:uploadId/thumbnail', (req, res) => servePhoto(req, res, 'thumbnail'));

  return router;
}
