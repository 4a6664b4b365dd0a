import { randomUUID } from 'node:crypto';
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import sharp from 'sharp';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { uploadSchema, type UploadDto } from '../../../shared/schemas/fleet.js';
import { attachUploads, storeUpload } from '../../../server/commands/uploads.js';
import type { AppContext } from '../../../server/context.js';
import { Upload } from '../../../server/entities/Upload.js';
import type { User } from '../../../server/entities/User.js';
import { HttpError } from '../../../server/errors.js';
import { isStoredName, type Storage } from '../../../server/storage/index.js';
import { LocalDiskStorage } from '../../../server/storage/local-disk.js';
import { freshToken, signedInUser, type SignedInUser } from '../../helpers/auth.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

/** A noisy photo, so the encoded file is realistically larger than its thumbnail. */
function photo(format: 'jpeg' | 'png' | 'webp', widthPx = 800, heightPx = 600): Promise<Buffer> {
  return sharp({ create: { width: widthPx, height: heightPx, channels: 3, background: '#c33', noise: { type: 'gaussian', mean: 128, sigma: 40 } } })
    .toFormat(format)
    .toBuffer();
}

describe('uploads: one path for every photo', () => {
  let server: TestServer;
  let uploadsDir: string;
  let rigger: SignedInUser;
  let operator: SignedInUser;
  let viewer: SignedInUser;
  let admin: SignedInUser;

  // Minted at each call: one test moves the server's clock past the 15-minute access token.
  const bearer = (who: SignedInUser) => ({ Authorization: `Bearer ${freshToken(server, who)}` });
  const filesInUploads = () => (existsSync(uploadsDir) ? readdirSync(uploadsDir).sort() : []);
  const uploadRows = () => server.context.dataSource.manager.count(Upload);
  const rowOf = (id: string) => server.context.dataSource.manager.findOneByOrFail(Upload, { id });
  const post = (who: SignedInUser | null, bytes: Buffer, filename: string, field = 'file') => {
    const req = request(server.app).post('/api/uploads');
    if (who) req.set(bearer(who));
    return req.attach(field, bytes, filename);
  };
  async function uploadAs(who: SignedInUser, bytes?: Buffer): Promise<UploadDto> {
    const res = await post(who, bytes ?? (await photo('jpeg')), 'site.jpg').expect(201);
    return uploadSchema.parse(res.body);
  }
  /** Snapshot of what is on disk and in the table, to prove a refusal left nothing behind. */
  async function snapshot() {
    return { files: filesInUploads(), rows: await uploadRows() };
  }

  beforeAll(async () => {
    server = await startTestServer();
    uploadsDir = path.join(server.dataDir, 'uploads');
    rigger = await signedInUser(server, { qualifications: ['rigger'] });
    operator = await signedInUser(server, { qualifications: ['operator'] });
    viewer = await signedInUser(server, { qualifications: ['viewer'] });
    admin = await signedInUser(server, { qualifications: [], isAdmin: true });
  });
  afterAll(() => server.stop());

  it.each([
    ['jpeg', 'image/jpeg', 'jpg'],
    ['png', 'image/png', 'png'],
    ['webp', 'image/webp', 'webp'],
  ] as const)('stores a %s photo with a thumbnail and serves both to its uploader', async (format, mimeType, extension) => {
    const bytes = await photo(format);
    const before = await snapshot();
    const res = await post(rigger, bytes, `crane-pad.${extension}`).expect(201);
    const body = uploadSchema.parse(res.body);
    expect(body).toMatchObject({ mimeType, sizeBytes: bytes.length, widthPx: 800, heightPx: 600 });
    expect(body.url).toMatch(new RegExp(`^/api/uploads/${body.id}\\?exp=\\d+&sig=[A-Za-z0-9_-]{43}$`));
    expect(body.thumbnailUrl).toMatch(new RegExp(`^/api/uploads/${body.id}/thumbnail\\?exp=\\d+&sig=`));
    expect(res.headers.location).toBe(`/api/uploads/${body.id}`);

    const row = await rowOf(body.id);
    expect(row).toMatchObject({ uploadedBy: rigger.user.id, ownerKind: null, ownerId: null, mimeType });
    expect(row.storedName).toMatch(new RegExp(`\\.${extension}$`));
    expect(isStoredName(row.storedName) && isStoredName(row.thumbnailName)).toBe(true);
    expect(filesInUploads()).toEqual([...before.files, row.storedName, row.thumbnailName].sort());
    expect(await uploadRows()).toBe(before.rows + 1);
    expect(readFileSync(path.join(uploadsDir, row.storedName)).equals(bytes)).toBe(true);

    const thumbnailBytes = readFileSync(path.join(uploadsDir, row.thumbnailName));
    const thumbnail = await sharp(thumbnailBytes).metadata();
    expect([thumbnail.format, thumbnail.width, thumbnail.height]).toEqual(['webp', 320, 240]);
    expect(thumbnailBytes.length).toBeLessThan(bytes.length);

    // Signed-in uploader, bare path, bearer token.
    const served = await request(server.app).get(`/api/uploads/${body.id}`).set(bearer(rigger)).buffer(true).expect(200);
    expect(served.headers['content-type']).toBe(mimeType);
    expect(served.headers['cache-control']).toBe('private, max-age=86400');
    expect(served.headers['x-content-type-options']).toBe('nosniff');
    expect(Buffer.compare(served.body as Buffer, bytes)).toBe(0);
    const thumb = await request(server.app).get(`/api/uploads/${body.id}/thumbnail`).set(bearer(rigger)).buffer(true).expect(200);
    expect(thumb.headers['content-type']).toBe('image/webp');
    expect(Buffer.compare(thumb.body as Buffer, thumbnailBytes)).toBe(0);

    // The presented URLs work without any token, as an <img src> would use them.
    const bySig = await request(server.app).get(body.url).buffer(true).expect(200);
    expect(Buffer.compare(bySig.body as Buffer, bytes)).toBe(0);
    await request(server.app).get(body.thumbnailUrl).expect(200).expect('Content-Type', 'image/webp');
  });

  it('reports the size as the photo is shown (EXIF orientation) and turns the thumbnail upright', async () => {
    const sideways = await sharp(await photo('jpeg')).withMetadata({ orientation: 6 }).jpeg().toBuffer();
    const body = await uploadAs(rigger, sideways);
    expect([body.widthPx, body.heightPx]).toEqual([600, 800]);
    const row = await rowOf(body.id);
    const thumbnail = await sharp(readFileSync(path.join(uploadsDir, row.thumbnailName))).metadata();
    expect([thumbnail.width, thumbnail.height]).toEqual([240, 320]);
  });

  it('refuses anonymous people with 401, before reading the photo and without storing anything', async () => {
    const body = await uploadAs(rigger);
    const before = await snapshot();
    const res = await post(null, await photo('jpeg'), 'site.jpg').expect(401);
    expect(res.body.error.code).toBe('unauthenticated');
    expect(await snapshot()).toEqual(before);

    for (const url of [`/api/uploads/${body.id}`, `/api/uploads/${body.id}/thumbnail`]) {
      expect((await request(server.app).get(url).expect(401)).body.error.code).toBe('unauthenticated');
    }
    const badToken = await request(server.app).get(`/api/uploads/${body.id}`).set('Authorization', 'Bearer not-a-token').expect(401);
    expect(badToken.body.error.code).toBe('token_invalid');
  });

  it('refuses another non-admin person while the photo is unattached; an admin may see it', async () => {
    const body = await uploadAs(rigger);
    for (const url of [`/api/uploads/${body.id}`, `/api/uploads/${body.id}/thumbnail`]) {
      expect((await request(server.app).get(url).set(bearer(operator)).expect(403)).body.error.code).toBe('forbidden');
      expect((await request(server.app).get(url).set(bearer(viewer)).expect(403)).body.error.code).toBe('forbidden');
      await request(server.app).get(url).set(bearer(admin)).expect(200);
    }
  });

  it('answers 404 for an unknown or malformed id', async () => {
    for (const id of [randomUUID(), 'not-an-id', '..%2F..%2Fetc%2Fpasswd']) {
      const res = await request(server.app).get(`/api/uploads/${id}`).set(bearer(rigger)).expect(404);
      expect(res.body.error.code).toBe('not_found');
      await request(server.app).get(`/api/uploads/${id}/thumbnail`).set(bearer(rigger)).expect(404);
    }
  });

  it('refuses a text file named .jpg with 415 and leaves nothing behind', async () => {
    const before = await snapshot();
    const res = await post(rigger, Buffer.from('This is a lifting plan note, not a photo.\n'.repeat(50)), 'boom-foot.jpg').expect(415);
    expect(res.body.error).toMatchObject({ code: 'unsupported_image', message: expect.stringMatching(/JPEG, PNG or WebP/) });
    expect(await snapshot()).toEqual(before);
  });

  it('refuses real images of other formats (GIF, TIFF) by content, whatever their name', async () => {
    const before = await snapshot();
    const gif = await sharp({ create: { width: 40, height: 30, channels: 3, background: '#3c3' } }).gif().toBuffer();
    const tiff = await sharp({ create: { width: 40, height: 30, channels: 3, background: '#33c' } }).tiff().toBuffer();
    expect((await post(rigger, gif, 'pin.png').expect(415)).body.error.code).toBe('unsupported_image');
    expect((await post(rigger, tiff, 'pin.webp').expect(415)).body.error.code).toBe('unsupported_image');
    expect(await snapshot()).toEqual(before);
  });

  it('refuses a truncated JPEG with 415 and leaves nothing behind', async () => {
    const whole = await photo('jpeg');
    const before = await snapshot();
    const res = await post(rigger, whole.subarray(0, Math.floor(whole.length / 2)), 'half.jpg').expect(415);
    expect(res.body.error.code).toBe('unsupported_image');
    expect(await snapshot()).toEqual(before);
  });

  it('refuses a 12 MB file with 413 and leaves nothing behind', async () => {
    const jpegHeader = Buffer.from([0xff, 0xd8, 0xff, 0xe0, 0x00, 0x10, 0x4a, 0x46, 0x49, 0x46, 0x00]);
    const big = Buffer.concat([jpegHeader, Buffer.alloc(12 * 1024 * 1024)]);
    const before = await snapshot();
    const res = await post(rigger, big, 'huge.jpg').expect(413);
    expect(res.body.error).toMatchObject({ code: 'too_large', message: expect.stringMatching(/^Photos can be at most 10 MB/) });
    expect(await snapshot()).toEqual(before);
  });

  // A name that carries a folder is refused outright when it arrives as sent (uploads-hostile.test.ts);
  // a form library sends only its last part, which is then never used for a path.
  it('never uses the file name for a path: the photo gets a generated name inside the uploads folder only', async () => {
    const before = await snapshot();
    const outside = readdirSync(server.dataDir).sort();
    const res = await post(rigger, await photo('jpeg'), '../../etc/passwd.jpg').expect(201);
    const row = await rowOf(res.body.id as string);
    expect(filesInUploads()).toEqual([...before.files, row.storedName, row.thumbnailName].sort());
    expect(filesInUploads().every(isStoredName)).toBe(true);
    expect(readdirSync(server.dataDir).sort()).toEqual(outside);
    expect(existsSync(path.resolve(uploadsDir, '../../etc/passwd.jpg'))).toBe(false);
    expect(JSON.stringify(res.body)).not.toContain('passwd');
  });

  it('answers 400 naming the field when no file arrives, or it arrives in another field', async () => {
    const before = await snapshot();
    const textOnly = await request(server.app).post('/api/uploads').set(bearer(rigger)).field('note', 'no photo here').expect(400);
    expect(textOnly.body.error).toMatchObject({ code: 'validation', fields: [{ path: 'file' }] });
    const json = await request(server.app).post('/api/uploads').set(bearer(rigger)).send({}).expect(400);
    expect(json.body.error).toMatchObject({ code: 'validation', fields: [{ path: 'file' }] });
    const wrongField = await post(rigger, await photo('png'), 'pad.png', 'photo').expect(400);
    expect(wrongField.body.error).toMatchObject({ code: 'validation', fields: [{ path: 'file' }] });
    const two = await request(server.app)
      .post('/api/uploads')
      .set(bearer(rigger))
      .attach('file', await photo('png'), 'a.png')
      .attach('file', await photo('png'), 'b.png')
      .expect(400);
    expect(two.body.error).toMatchObject({ code: 'validation', fields: [{ path: 'file' }] });
    expect(await snapshot()).toEqual(before);
  });

  it('decides who may upload before reading the body: 12 MB from anonymous is 401, from a viewer 403, not 413', async () => {
    const big = Buffer.concat([Buffer.from([0xff, 0xd8, 0xff, 0xe0]), Buffer.alloc(12 * 1024 * 1024)]);
    const before = await snapshot();
    expect((await post(null, big, 'huge.jpg').expect(401)).body.error.code).toBe('unauthenticated');
    expect((await post(viewer, big, 'huge.jpg').expect(403)).body.error.code).toBe('forbidden');
    expect(await snapshot()).toEqual(before);
  });

  it('refuses a viewer with 403 and stores nothing', async () => {
    const before = await snapshot();
    const res = await post(viewer, await photo('jpeg'), 'watching.jpg').expect(403);
    expect(res.body.error.code).toBe('forbidden');
    expect(await snapshot()).toEqual(before);
  });

  it('refuses a tampered signature, or one for another photo, with 401', async () => {
    const mine = await uploadAs(rigger);
    const theirs = await uploadAs(operator);
    const [, query] = mine.url.split('?') as [string, string];
    const params = new URLSearchParams(query);
    const sig = params.get('sig')!;
    const exp = params.get('exp')!;
    const flipped = (sig[0] === 'A' ? 'B' : 'A') + sig.slice(1);
    const cases = [
      `/api/uploads/${mine.id}?exp=${exp}&sig=${flipped}`,
      `/api/uploads/${mine.id}?exp=${Number(exp) + 3600}&sig=${sig}`,
      `/api/uploads/${theirs.id}?exp=${exp}&sig=${sig}`,
      `/api/uploads/${theirs.id}/thumbnail?exp=${exp}&sig=${sig}`,
      `/api/uploads/${mine.id}?sig=${sig}`,
      `/api/uploads/${mine.id}?exp=${exp}`,
    ];
    for (const url of cases) {
      const res = await request(server.app).get(url).expect(401);
      expect(res.body.error.code).toBe('photo_link_invalid');
    }
    // A bad signature never hides a good bearer token, and never lifts a bad one.
    await request(server.app).get(`/api/uploads/${mine.id}?exp=${exp}&sig=${flipped}`).set(bearer(rigger)).expect(200);
    await request(server.app).get(`/api/uploads/${theirs.id}?exp=${exp}&sig=${sig}`).set(bearer(rigger)).expect(403);
  });

  describe('attachUploads', () => {
    const attach = (ids: string[], kind: Upload['ownerKind'] & string, ownerId: string, actor: User) =>
      server.context.queue.transaction((m) => attachUploads(m, ids, kind, ownerId, actor.id));
    async function refusal(work: Promise<unknown>): Promise<HttpError> {
      const err = await work.then(
        () => null,
        (e: unknown) => e,
      );
      expect(err).toBeInstanceOf(HttpError);
      return err as HttpError;
    }

    it('attaches the actor’s own uploads, after which anyone who may read the fleet sees an inspection photo', async () => {
      const first = await uploadAs(rigger);
      const second = await uploadAs(rigger);
      const inspectionId = randomUUID();
      const attached = await attach([second.id, first.id], 'inspection', inspectionId, rigger.user);
      expect(attached.map((u) => u.id)).toEqual([second.id, first.id]);
      expect(await rowOf(first.id)).toMatchObject({ ownerKind: 'inspection', ownerId: inspectionId });
      await request(server.app).get(`/api/uploads/${first.id}`).set(bearer(operator)).expect(200);
      await request(server.app).get(`/api/uploads/${first.id}/thumbnail`).set(bearer(viewer)).expect(200);
      // A photo is the evidence of one record: attaching it again is refused, even to the same owner
      // (on the board the owner is the job, so "same owner" would let one photo stand for two steps).
      const again = await refusal(attach([first.id], 'inspection', inspectionId, rigger.user));
      expect([again.status, again.code, again.fields?.map((f) => f.path)]).toEqual([409, 'photo_already_used', ['photoIds.0']]);
    });

    it('keeps a defect photo to its uploader and admins for now', async () => {
      const body = await uploadAs(rigger);
      await attach([body.id], 'defect', randomUUID(), rigger.user);
      await request(server.app).get(`/api/uploads/${body.id}`).set(bearer(operator)).expect(403);
      await request(server.app).get(`/api/uploads/${body.id}`).set(bearer(rigger)).expect(200);
      await request(server.app).get(`/api/uploads/${body.id}`).set(bearer(admin)).expect(200);
    });

    it('refuses another person’s upload, naming photoIds.N; an admin may attach it', async () => {
      const mine = await uploadAs(rigger);
      const theirs = await uploadAs(operator);
      const err = await refusal(attach([mine.id, theirs.id], 'inspection', randomUUID(), rigger.user));
      expect(err.status).toBe(400);
      expect(err.code).toBe('validation');
      expect(err.fields?.map((f) => f.path)).toEqual(['photoIds.1']);
      // Nothing was attached: the whole list failed together.
      expect((await rowOf(mine.id)).ownerKind).toBeNull();
      await attach([theirs.id], 'inspection', randomUUID(), admin.user);
      expect((await rowOf(theirs.id)).ownerKind).toBe('inspection');
    });

    it('refuses an upload already attached to something else, an unknown id and a repeated id', async () => {
      const taken = await uploadAs(rigger);
      const free = await uploadAs(rigger);
      const firstOwner = randomUUID();
      await attach([taken.id], 'inspection', firstOwner, rigger.user);
      const err = await refusal(attach([free.id, taken.id, randomUUID(), free.id], 'inspection', randomUUID(), rigger.user));
      expect(err.status).toBe(400);
      expect(err.fields?.map((f) => f.path)).toEqual(['photoIds.1', 'photoIds.2', 'photoIds.3']);
      expect(err.fields?.[0].message).toMatch(/already the evidence for an inspection/);
      expect(await rowOf(taken.id)).toMatchObject({ ownerKind: 'inspection', ownerId: firstOwner });
      expect((await rowOf(free.id)).ownerKind).toBeNull();
      // Same owner id but another kind is still something else; reuse alone is its own code.
      const reused = await refusal(attach([taken.id], 'step', firstOwner, rigger.user));
      expect([reused.status, reused.code, reused.fields?.[0].path]).toEqual([409, 'photo_already_used', 'photoIds.0']);
    });
  });

  describe('nothing left behind when a step after a write fails', () => {
    it('removes the photo when writing the thumbnail fails', async () => {
      const disk = new LocalDiskStorage(uploadsDir);
      let puts = 0;
      const failingSecond: Storage = {
        put: async (name, bytes) => {
          puts += 1;
          if (puts === 2) throw new Error('disk full');
          await disk.put(name, bytes);
        },
        get: (name) => disk.get(name),
        remove: (name) => disk.remove(name),
      };
      const before = await snapshot();
      const context: AppContext = { ...server.context, storage: failingSecond };
      await expect(storeUpload(context, rigger.user, { buffer: await photo('jpeg') })).rejects.toThrow('disk full');
      expect(puts).toBe(2);
      expect(await snapshot()).toEqual(before);
    });

    it('removes both files when recording the row fails', async () => {
      const before = await snapshot();
      const failingQueue = { transaction: () => Promise.reject(new Error('database is locked')) } as unknown as AppContext['queue'];
      const context: AppContext = { ...server.context, queue: failingQueue };
      await expect(storeUpload(context, rigger.user, { buffer: await photo('png') })).rejects.toThrow('database is locked');
      expect(await snapshot()).toEqual(before);
    });
  });

  it('the local disk storage accepts only names it generated and never overwrites', async () => {
    const disk = new LocalDiskStorage(uploadsDir);
    const bytes = Buffer.from('x');
    for (const name of ['../escape.jpg', '../../etc/passwd.jpg', 'photo.jpg', `${randomUUID()}.exe`, `${randomUUID().toUpperCase()}.jpg`, `${randomUUID()}.jpg/..`, `sub/${randomUUID()}.jpg`]) {
      await expect(disk.put(name, bytes)).rejects.toThrow(/only generated names/);
      await expect(disk.get(name)).rejects.toThrow(/only generated names/);
      await expect(disk.remove(name)).rejects.toThrow(/only generated names/);
    }
    const name = `${randomUUID()}.png`;
    await disk.put(name, bytes);
    await expect(disk.put(name, Buffer.from('y'))).rejects.toMatchObject({ code: 'EEXIST' });
    expect(readFileSync(path.join(uploadsDir, name), 'utf8')).toBe('x');
    await disk.remove(name);
    await disk.remove(name);
    expect(await disk.get(name)).toBeNull();
  });

  // Last: it moves the server's clock 13 hours on.
  it('refuses an expired signed URL with 401, while a bearer token still works', async () => {
    const body = await uploadAs(rigger);
    await request(server.app).get(body.url).expect(200);
    server.advance(12 * 60 * 60 * 1000 - 60_000);
    await request(server.app).get(body.thumbnailUrl).expect(200);
    server.advance(60 * 60 * 1000 + 120_000);
    const res = await request(server.app).get(body.url).expect(401);
    expect(res.body.error).toMatchObject({ code: 'photo_link_expired', message: expect.stringMatching(/Reload the page/) });
    await request(server.app).get(body.thumbnailUrl).expect(401);
    await request(server.app).get(body.url).set(bearer(rigger)).expect(200);
  });
});
