import { onBeforeUnmount, ref, watch, type Ref } from 'vue';
import { uploadSchema, type UploadDto } from '../../shared/schemas/fleet';
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

/** Uploads one photo (POST /api/uploads) and keeps its state for a form. */
export function usePhotoUpload() {
  const photo = ref<UploadDto | null>(null);
  const uploading = ref(false);
  const problem = ref('');

  async function upload(file: File): Promise<UploadDto | null> {
    const form = new FormData();
    form.append('file', file);
    uploading.value = true;
    problem.value = '';
    try {
      photo.value = await api('/uploads', { method: 'POST', body: form, schema: uploadSchema });
      return photo.value;
    } catch (error) {
      photo.value = null;
      if (error instanceof ApiRequestError && error.code === 'too_large') problem.value = 'The photo is larger than 10 MB. Take it again at a lower resolution.';
      else if (error instanceof ApiRequestError && error.code === 'unsupported_image') problem.value = 'That file is not a JPEG, PNG or WebP photo.';
      else problem.value = describeError(error);
      return null;
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
