import { existsSync, readFileSync, statSync } from 'node:fs';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import path from 'node:path';
import { brotliCompressSync, constants, gzipSync } from 'node:zlib';
import { contentSecurityPolicy } from '../../server/middlewares/security.js';

const contentTypes: Record<string, string> = {
  '.html': 'text/html; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.svg': 'image/svg+xml',
  '.png': 'image/png',
  '.ico': 'image/x-icon',
  '.json': 'application/json',
  '.woff': 'font/woff',
  '.woff2': 'font/woff2',
  '.ttf': 'font/ttf',
  '.eot': 'application/vnd.ms-fontobject',
  '.webmanifest': 'application/manifest+json',
};

/** The Content-Type a static file is served with. */
export function contentTypeOf(file: string): string {
  return contentTypes[path.extname(file).toLowerCase()] ?? 'application/octet-stream';
}

/** The file under `dir` a URL path names, or null (no such file, or a path that climbs out of `dir`). */
export function fileIn(dir: string, urlPath: string): string | null {
  let decoded: string;
  try {
    decoded = decodeURIComponent(urlPath);
  } catch {
    return null;
  }
  const file = path.resolve(dir, `.${path.posix.normalize(decoded)}`);
  if (file !== dir && !file.startsWith(dir + path.sep)) return null;
  return existsSync(file) && statSync(file).isFile() ? file : null;
}

/** Holdline's content security policy as a header value, so the empty page runs under the same rules. */
export function policyHeader(): string {
  return Object.entries(contentSecurityPolicy)
    .map(([name, values]) => `${name.replace(/[A-Z]/g, (c) => `-${c.toLowerCase()}`)} ${values.join(' ')}`)
    .join('; ');
}

export interface StaticServer {
  url: string;
  close(): Promise<void>;
}

/** Scripts, style sheets and SVGs: what Holdline's build keeps a Brotli and a gzip copy of. */
const COMPRESSED = /\.(js|css|svg)$/;

/**
 * The body to send for `file` and its Content-Encoding, chosen like Holdline's server
 * (server/app.ts): Brotli first, then gzip, at the strongest levels, made once per file; the file
 * itself to a browser that accepts neither, and for every other kind of file.
 */
function encoded(file: string, body: Buffer, acceptEncoding: string, cache: Map<string, Buffer>): { body: Buffer; encoding?: string } {
  if (!COMPRESSED.test(file)) return { body };
  const encoding = /\bbr\b/.test(acceptEncoding) ? 'br' : /\bgzip\b/.test(acceptEncoding) ? 'gzip' : undefined;
  if (!encoding) return { body };
  const key = `${encoding}:${file}`;
  let copy = cache.get(key);
  if (!copy) {
    copy =
      encoding === 'br'
        ? brotliCompressSync(body, { params: { [constants.BROTLI_PARAM_QUALITY]: constants.BROTLI_MAX_QUALITY } })
        : gzipSync(body, { level: 9 });
    cache.set(key, copy);
  }
  // As in vite-plugin-compression2, a copy no smaller than its file is not used.
  return copy.length < body.length ? { body: copy, encoding } : { body };
}

/**
 * Serves a built folder on 127.0.0.1 (a port from the OS) the way Holdline's server serves its
 * build: scripts, style sheets and SVGs compressed as the browser accepts, any other path answered
 * with index.html. A baseline sent uncompressed would flatter Holdline's ratio.
 */
export async function serveFolder(dir: string): Promise<StaticServer> {
  const root = path.resolve(dir);
  const csp = policyHeader();
  const copies = new Map<string, Buffer>();
  const server = http.createServer((req, res) => {
    const pathname = new URL(req.url ?? '/', 'http://localhost').pathname;
    const file = fileIn(root, pathname) ?? path.join(root, 'index.html');
    let raw: Buffer;
    try {
      raw = readFileSync(file);
    } catch {
      res.writeHead(404, { 'Content-Type': 'text/plain' }).end('not found');
      return;
    }
    const { body, encoding } = encoded(file, raw, String(req.headers['accept-encoding'] ?? ''), copies);
    res.writeHead(200, {
      'Content-Type': contentTypeOf(file),
      'Content-Length': body.length,
      ...(encoding ? { 'Content-Encoding': encoding } : {}),
      ...(COMPRESSED.test(file) ? { Vary: 'Accept-Encoding' } : {}),
      'Content-Security-Policy': csp,
      'Cache-Control': file.endsWith('index.html') ? 'no-cache' : 'public, max-age=3600',
    });
    res.end(req.method === 'HEAD' ? undefined : body);
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(0, '127.0.0.1', () => resolve());
  });
  const { port } = server.address() as AddressInfo;
  return {
    url: `http://127.0.0.1:${port}`,
    close: () =>
      new Promise<void>((resolve) => {
        server.closeAllConnections();
        server.close(() => resolve());
      }),
  };
}
