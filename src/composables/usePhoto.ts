import { onBeforeUnmount, ref, watch, type Ref } from 'vue';
import type { UploadDto } from '../../shared/schemas/fleet';
import { api, ApiRequestError, describeError, fetchBlob } from '../services/api';

/**
 * An object URL for a photo's thumbnail, fetched with the session's token (board snapshots carry
 * only photo ids, and an <img> cannot send the token). Revoked when the id changes or the
 * component goes away.
 */
export function usePhotoThumbnail(photoId: Ref<string | null>) {
  const url = ref<string | null>(null);
  const problem = ref('');
  let current: string | null = null;

  function release() {
    if (current) URL.revokeObjectURL(current);
    current = null;
    url.value = null;
  }

  watch(
    photoId,
    async (id) => {
      release();
      problem.value = '';
      if (!id) return;
      try {
        const blob = await fetchBlob(`/uploads/${encodeURIComponent(id)}/thumbnail`);
        // A newer id may have arrived while this one was loading.
        if (photoId.value !== id) return;
        current = URL.createObjectURL(blob);
        url.value = current;
      } catch (error) {
        problem.value = describeError(error);
      }
    },
    { immediate: true },
  );
  onBeforeUnmount(release);
  return { url, problem };
}

/** The photo's own name when the device gave one, so a list of several says which one failed. */
const photoName = (file: File) => (file.name ? `The photo ${file.name}` : 'The photo');

/**
 * The one way a photo reaches the server (POST /api/uploads), for the board and the fleet forms
 * alike: the stored photo, or a sentence saying what to do instead.
 */
export async function uploadPhoto(file: File): Promise<{ photo: UploadDto } | { problem: string }> {
  const form = new FormData();
  form.append('file', file);
  try {
    // Fetched on the first upload: the fleet schemas it lives with are no part of a board's first screen.
    const { uploadSchema } = await import('../../shared/schemas/fleet');
    return { photo: await api('/uploads', { method: 'POST', body: form, schema: uploadSchema }) };
  } catch (error) {
    if (error instanceof ApiRequestError && error.code === 'too_large') return { problem: `${photoName(file)} is larger than 10 MB. Take it again at a lower resolution.` };
    if (error instanceof ApiRequestError && error.code === 'unsupported_image') return { problem: `${file.name ? `The file ${file.name}` : 'That file'} is not a photo (JPEG, PNG or WebP). Take the photo again with the camera.` };
    return { problem: describeError(error) };
  }
}

/** One photo for a form: its upload state beside `uploadPhoto`'s answer. */
export function usePhotoUpload() {
  const photo = ref<UploadDto | null>(null);
  const uploading = ref(false);
  const problem = ref('');

  async function upload(file: File): Promise<UploadDto | null> {
    uploading.value = true;
    problem.value = '';
    try {
      const answer = await uploadPhoto(file);
      photo.value = 'photo' in answer ? answer.photo : null;
      problem.value = 'problem' in answer ? answer.problem : '';
      return photo.value;
    } finally {
      uploading.value = false;
    }
  }

  function clear() {
    photo.value = null;
    problem.value = '';
  }
  return { photo, uploading, problem, upload, clear };
}
