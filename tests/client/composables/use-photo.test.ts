import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { uploadPhoto, usePhotoUpload } from '../../../src/composables/usePhoto';
import { json } from '../api-fakes';

type FetchArgs = [input: string, init?: RequestInit];

const stored = { id: '7c1d2e3f-4a5b-4c6d-8e7f-9a0b1c2d3e4f', url: '/api/uploads/7c1d/full', thumbnailUrl: '/api/uploads/7c1d/thumbnail', mimeType: 'image/jpeg', sizeBytes: 2048, widthPx: 640, heightPx: 480 };
const photo = (name: string) => new File([new Uint8Array([0xff, 0xd8, 0xff])], name, { type: 'image/jpeg' });

describe('the one photo upload', () => {
  let fetchMock: ReturnType<typeof vi.fn<(...args: FetchArgs) => Promise<Response>>>;

  beforeEach(() => {
    fetchMock = vi.fn<(...args: FetchArgs) => Promise<Response>>();
    vi.stubGlobal('fetch', fetchMock);
  });
  afterEach(() => {
    vi.unstubAllGlobals();
  });

  it('sends the file as a form to POST /api/uploads and answers the stored photo', async () => {
    fetchMock.mockResolvedValueOnce(json(201, stored));
    const answer = await uploadPhoto(photo('pin-3.jpg'));
    expect(answer).toEqual({ photo: expect.objectContaining({ id: stored.id }) });
    const [url, init] = fetchMock.mock.calls[0];
    expect(url).toBe('/api/uploads');
    expect(init?.method).toBe('POST');
    expect(init?.body).toBeInstanceOf(FormData);
  });

  it('says which photo was refused and what to do, in the same words on the board and in the fleet forms', async () => {
    fetchMock.mockResolvedValueOnce(json(413, { error: { code: 'too_large', message: 'File too large' } }));
    expect(await uploadPhoto(photo('pin-3.jpg'))).toEqual({ problem: 'The photo pin-3.jpg is larger than 10 MB. Take it again at a lower resolution.' });
    fetchMock.mockResolvedValueOnce(json(415, { error: { code: 'unsupported_image', message: 'Unsupported' } }));
    expect(await uploadPhoto(photo(''))).toEqual({ problem: 'That file is not a photo (JPEG, PNG or WebP). Take the photo again with the camera.' });
    fetchMock.mockResolvedValueOnce(json(415, { error: { code: 'unsupported_image', message: 'Unsupported' } }));
    expect(await uploadPhoto(photo('notes.jpg'))).toEqual({ problem: 'The file notes.jpg is not a photo (JPEG, PNG or WebP). Take the photo again with the camera.' });
  });

  it('keeps a form’s photo and its problem from that one answer', async () => {
    const form = usePhotoUpload();
    fetchMock.mockResolvedValueOnce(json(413, { error: { code: 'too_large', message: 'File too large' } }));
    expect(await form.upload(photo('lacing.jpg'))).toBeNull();
    expect(form.problem.value).toBe('The photo lacing.jpg is larger than 10 MB. Take it again at a lower resolution.');
    expect(form.uploading.value).toBe(false);

    fetchMock.mockResolvedValueOnce(json(201, stored));
    expect((await form.upload(photo('lacing-2.jpg')))?.id).toBe(stored.id);
    expect(form.photo.value?.id).toBe(stored.id);
    expect(form.problem.value).toBe('');
  });
});
