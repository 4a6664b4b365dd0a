import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import http, { type IncomingHttpHeaders } from 'node:http';
import os from 'node:os';
import path from 'node:path';
import { brotliCompressSync, brotliDecompressSync, gunzipSync, gzipSync } from 'node:zlib';
import { io as connect } from 'socket.io-client';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { loadConfig } from '../../server/config.js';
import { signedInUser } from '../helpers/auth.js';
import { startTestServer, type TestServer } from '../helpers/server.js';

interface RawAnswer {
  status: number;
  headers: IncomingHttpHeaders;
  /** The body exactly as it came over the wire, not decompressed. */
  body: Buffer;
}

/** A GET with exactly these headers (supertest and fetch would add an Accept-Encoding and unpack the answer). */
function rawGet(url: string, headers: Record<string, string> = {}): Promise<RawAnswer> {
  return new Promise((resolve, reject) => {
    const req = http.get(url, { headers }, (res) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => resolve({ status: res.statusCode ?? 0, headers: res.headers, body: Buffer.concat(chunks) }));
      res.on('error', reject);
    });
    req.on('error', reject);
  });
}

describe('the built client is sent compressed', () => {
  let clientDir: string;
  let server: TestServer;
  // A script large enough to be worth compressing, as a build writes it with its .br and .gz copies beside it.
  const script = Buffer.from(Array.from({ length: 400 }, (_, i) => `export const line${i} = 'the cab shows stage ${i} of the erection';\n`).join(''));
  const scriptPath = '/assets/index-AbC123.js';

  beforeAll(async () => {
    clientDir = mkdtempSync(path.join(os.tmpdir(), 'holdline-client-static-'));
    mkdirSync(path.join(clientDir, 'assets'));
    writeFileSync(path.join(clientDir, 'index.html'), `<!doctype html><title>Holdline</title><div id="app"></div><script type="module" src="${scriptPath}"></script>`);
    writeFileSync(path.join(clientDir, scriptPath), script);
    writeFileSync(path.join(clientDir, `${scriptPath}.gz`), gzipSync(script, { level: 9 }));
    writeFileSync(path.join(clientDir, `${scriptPath}.br`), brotliCompressSync(script));
    // A file the build left without copies (it skips a copy that would be no smaller than the file).
    writeFileSync(path.join(clientDir, 'favicon.svg'), '<svg xmlns="http://www.w3.org/2000/svg"/>');
    vi.stubEnv('HOLDLINE_TEST_CLIENT_DIR', clientDir);
    server = await startTestServer({ withClient: true });
  });
  afterAll(async () => {
    vi.unstubAllEnvs();
    await server?.stop();
    rmSync(clientDir, { recursive: true, force: true });
  });

  it('answers gzip to a browser that accepts only gzip, the same bytes once unpacked', async () => {
    const res = await rawGet(`${server.url}${scriptPath}`, { 'Accept-Encoding': 'gzip' });
    expect(res.status).toBe(200);
    expect(res.headers['content-encoding']).toBe('gzip');
    expect(res.headers['content-type']).toMatch(/^text\/javascript/);
    expect(res.headers.vary).toMatch(/Accept-Encoding/i);
    expect(res.body.length).toBeLessThan(script.length / 3);
    expect(gunzipSync(res.body).equals(script)).toBe(true);
  });

  it('prefers Brotli when the browser accepts it, the same bytes once unpacked', async () => {
    const res = await rawGet(`${server.url}${scriptPath}`, { 'Accept-Encoding': 'gzip, deflate, br, zstd' });
    expect(res.headers['content-encoding']).toBe('br');
    expect(res.headers['content-type']).toMatch(/^text\/javascript/);
    expect(brotliDecompressSync(res.body).equals(script)).toBe(true);
  });

  it('sends the file as it is without an Accept-Encoding', async () => {
    const res = await rawGet(`${server.url}${scriptPath}`);
    expect(res.status).toBe(200);
    expect(res.headers['content-encoding']).toBeUndefined();
    expect(res.headers['content-type']).toMatch(/^text\/javascript/);
    expect(res.body.equals(script)).toBe(true);
  });

  it('lets browsers keep hashed assets for good and other files for an hour, under the security policy', async () => {
    const asset = await rawGet(`${server.url}${scriptPath}`, { 'Accept-Encoding': 'br' });
    expect(asset.headers['cache-control']).toBe('public, max-age=31536000, immutable');
    expect(asset.headers['content-security-policy']).toContain("script-src 'self'");
    const icon = await rawGet(`${server.url}/favicon.svg`, { 'Accept-Encoding': 'gzip, br' });
    expect(icon.status).toBe(200);
    expect(icon.headers['content-encoding']).toBeUndefined();
    expect(icon.headers['cache-control']).toBe('public, max-age=3600');
  });

  it('answers a client route with index.html, never cached, and leaves /api answers uncompressed', async () => {
    const page = await rawGet(`${server.url}/jobs/123/cab`, { 'Accept-Encoding': 'gzip, br' });
    expect(page.status).toBe(200);
    expect(page.headers['cache-control']).toBe('no-cache');
    expect(page.body.toString()).toContain(scriptPath);
    const health = await rawGet(`${server.url}/api/health`, { 'Accept-Encoding': 'gzip, br' });
    expect(health.status).toBe(200);
    expect(health.headers['content-encoding']).toBeUndefined();
    expect(JSON.parse(health.body.toString())).toMatchObject({ status: 'ok' });
  });

  it('still upgrades a board socket to a WebSocket', async () => {
    const who = await signedInUser(server);
    const socket = connect(server.url, { transports: ['websocket'], auth: { token: who.token }, reconnection: false, forceNew: true });
    try {
      await new Promise<void>((resolve, reject) => {
        socket.once('connect', () => resolve());
        socket.once('connect_error', reject);
      });
      expect(socket.io.engine.transport.name).toBe('websocket');
    } finally {
      socket.close();
    }
  });
});

describe('HOLDLINE_CLIENT_DIR', () => {
  it('names the client folder the server sends, dist/ beside the project by default', () => {
    expect(loadConfig({}).clientDir).toBe(path.resolve(import.meta.dirname, '..', '..', 'dist'));
    expect(loadConfig({ HOLDLINE_CLIENT_DIR: '/tmp/elsewhere/dist' }).clientDir).toBe('/tmp/elsewhere/dist');
    expect(loadConfig({ HOLDLINE_CLIENT_DIR: 'build/client' }).clientDir).toBe(path.resolve('build/client'));
  });
});
