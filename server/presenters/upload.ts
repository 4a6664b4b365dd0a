import type { PhotoDto, UploadDto } from '../../shared/schemas/fleet.js';
import { signUploadUrl } from '../auth/upload-urls.js';
import type { Upload } from '../entities/Upload.js';

/** What a presenter needs to sign photo URLs; an AppContext fits. */
export interface UrlSigner {
  secret: string;
  now(): Date;
}

/**
 * A photo's links, signed so `<img src>` works without a bearer token (see auth/upload-urls.ts).
 * Call it only when answering someone allowed to see what the photo belongs to.
 */
export function presentPhoto(upload: Upload, signer: UrlSigner): PhotoDto {
  const { exp, sig } = signUploadUrl(upload.id, signer.secret, signer.now());
  const query = `?exp=${exp}&sig=${sig}`;
  return { id: upload.id, url: `/api/uploads/${upload.id}${query}`, thumbnailUrl: `/api/uploads/${upload.id}/thumbnail${query}` };
}

/** The answer of POST /api/uploads: the photo's links and what was stored. */
export function presentUpload(upload: Upload, signer: UrlSigner): UploadDto {
  return {
    ...presentPhoto(upload, signer),
    mimeType: upload.mimeType,
    sizeBytes: upload.sizeBytes,
    widthPx: upload.widthPx,
    heightPx: upload.heightPx,
  };
}
