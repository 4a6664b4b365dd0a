import { readFileSync } from 'node:fs';
import http from 'node:http';
import path from 'node:path';
import express from 'express';
import { io as connect } from 'socket.io-client';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Config } from '../../../server/config.js';
import { originAllowed, securityHeaders } from '../../../server/middlewares/security.js';
import { apiErrorSchema } from '../../../shared/schemas/errors.js';
import { signedInUser, type SignedInUser } from '../../helpers/auth.js';
import { TEST_PASSWORD } from '../../helpers/factories.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

/**
 * Headers, the content security policy, and which origins may talk to the server.
 * Directive names and source expressions: W3C "Content Security Policy Level 3" (Working Draft),
 * §6 directives; `'self'` matching ws:/wss: on the same host: ibid. §6.7.2.8 "Does url match
 * expression in origin with redirect count?" (from memory). The header set follows the OWASP
 * "HTTP Security Response Headers Cheat Sheet" (common practice, no edition).
 */

const FOREIGN = 'https://another-site.example';

/** `default-src 'self'; img-src ...` → { 'default-src': ["'self'"], ... }. */
function directives(header: string | undefined): Map<string, string[]> {
  const map = new Map<string, string[]>();
  for (const part of (header ?? '').split(';')) {
    const [name, ...values] = part.trim().split(/\s+/);
    if (name) map.set(name.toLowerCase(), values);
  }
  return map;
}

/** The client folder the browser tests use: dist/, or HOLDLINE_TEST_CLIENT_DIR. */
const clientDir = path.resolve(import.meta.dirname, '..', '..', '..', process.env.HOLDLINE_TEST_CLIENT_DIR ?? 'dist');

describe('security headers and origins', () => {
  let server: TestServer;
  let person: SignedInUser;

  beforeAll(async () => {
    server = await startTestServer({ withClient: true });
    person = await signedInUser(server);
  });
  afterAll(() => server.stop());

  describe('content security policy', () => {
    it('is strict on the API and on the built client alike', async () => {
      for (const url of ['/api/health', '/', '/jobs/some-job/cab']) {
        const res = await request(server.app).get(url);
        const csp = directives(res.headers['content-security-policy']);
        expect(csp.get('default-src'), url).toEqual(["'self'"]);
        expect(csp.get('script-src'), url).toEqual(["'self'"]);
        expect(csp.get('script-src-attr'), url).toEqual(["'none'"]);
        expect(csp.get('style-src'), url).toEqual(["'self'"]);
        expect(csp.get('style-src-attr'), url).toEqual(["'none'"]);
        expect(csp.get('object-src'), url).toEqual(["'none'"]);
        expect(csp.get('base-uri'), url).toEqual(["'self'"]);
        expect(csp.get('frame-ancestors'), url).toEqual(["'none'"]);
        expect(csp.get('form-action'), url).toEqual(["'self'"]);
        expect(csp.get('connect-src'), url).toEqual(["'self'"]);
        expect(csp.get('img-src'), url).toEqual(["'self'", 'data:', 'blob:']);
        // Nothing inline, nothing evaluated, no remote host or scheme-wide source anywhere.
        const every = [...csp.values()].flat();
        expect(every.filter((v) => /unsafe|https?:|wss?:|\*/.test(v)), url).toEqual([]);
        // Plain-http site networks: assets must not be upgraded to https.
        expect(csp.has('upgrade-insecure-requests'), url).toBe(false);
      }
    });

    it('is met by the built index.html: no inline script or style, every asset from this server', async () => {
      const html = readFileSync(path.join(clientDir, 'index.html'), 'utf8');
      const scripts = [...html.matchAll(/<script\b([^>]*)>([\s\S]*?)<\/script>/gi)];
      expect(scripts.length).toBeGreaterThan(0);
      for (const [, attributes, body] of scripts) {
        expect(attributes).toMatch(/\ssrc="\/[^/]/);
        expect(body.trim()).toBe('');
      }
      expect(html).not.toMatch(/<style\b/i);
      expect(html).not.toMatch(/\sstyle\s*=/i);
      expect(html).not.toMatch(/\son[a-z]+\s*=/i);
      const references = [...html.matchAll(/\s(?:src|href)="([^"]*)"/gi)].map((m) => m[1]);
      expect(references.filter((ref) => !/^\/[^/]/.test(ref))).toEqual([]);
      // Each script and style sheet is served by this server, with its type and the same policy.
      for (const ref of references.filter((r) => /\.(js|css)$/.test(r))) {
        const res = await request(server.app).get(ref).expect(200);
        expect(res.headers['content-type'], ref).toMatch(ref.endsWith('.js') ? /javascript/ : /text\/css/);
        expect(res.headers['content-security-policy'], ref).toContain("script-src 'self'");
      }
    });
  });

  it('sends the other protective headers and no framework banner', async () => {
    const res = await request(server.app).get('/api/health').expect(200);
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['x-frame-options']).toBe('DENY');
    expect(res.headers['referrer-policy']).toBe('no-referrer');
    expect(res.headers['cross-origin-opener-policy']).toBe('same-origin');
    expect(res.headers['cross-origin-resource-policy']).toBe('same-origin');
    expect(res.headers['permissions-policy']).toContain('geolocation=()');
    expect(res.headers['x-powered-by']).toBeUndefined();
    // The test server's public address is plain http: no HSTS.
    expect(res.headers['strict-transport-security']).toBeUndefined();
  });

  it('asks for https only when the public address is https', async () => {
    const headersFor = async (publicUrl: string) => {
      const app = express();
      app.use(securityHeaders({ publicUrl } as Config));
      app.get('/', (_req, res) => void res.send('ok'));
      return (await request(app).get('/')).headers['strict-transport-security'];
    };
    expect(await headersFor('https://holdline.site.example')).toBe('max-age=15552000');
    expect(await headersFor('http://192.168.10.5:3000')).toBeUndefined();
  });

  describe('which origins may call the API', () => {
    it('refuses a page of another site before reading its body, with no Access-Control-Allow-Origin', async () => {
      const res = await request(server.app)
        .post('/api/auth/login')
        .set('Origin', FOREIGN)
        .send({ email: person.user.email, password: TEST_PASSWORD })
        .expect(403);
      expect(apiErrorSchema.parse(res.body).error).toEqual({
        code: 'origin_not_allowed',
        message: `Requests from another website are not accepted. Open Holdline at ${server.url}.`,
      });
      expect(res.headers['access-control-allow-origin']).toBeUndefined();
      expect(res.headers['access-control-allow-credentials']).toBeUndefined();
      // Not signed in: no refresh cookie was handed to the other site's page.
      expect(res.headers['set-cookie']).toBeUndefined();
    });

    it('answers a preflight and a read from another site without allowing them', async () => {
      const preflight = await request(server.app)
        .options('/api/users/me')
        .set('Origin', FOREIGN)
        .set('Access-Control-Request-Method', 'GET')
        .set('Access-Control-Request-Headers', 'authorization');
      expect(preflight.status).toBe(403);
      expect(preflight.headers['access-control-allow-origin']).toBeUndefined();
      expect(preflight.headers['access-control-allow-headers']).toBeUndefined();
      const read = await request(server.app).get('/api/health').set('Origin', FOREIGN).expect(403);
      expect(read.headers['access-control-allow-origin']).toBeUndefined();
    });

    it('lets through no Origin, the public address, and the address the request was sent to', async () => {
      const signIn = await request(server.app).post('/api/auth/login').set('Origin', server.url).send({ email: person.user.email, password: TEST_PASSWORD });
      expect(signIn.status).toBe(200);
      expect(signIn.headers['access-control-allow-origin']).toBeUndefined();
      for (const [origin, host] of [
        [undefined, undefined],
        [server.url, undefined],
        // The same server by its LAN address, and through the Vite dev server's proxy.
        ['http://192.168.10.5:3000', '192.168.10.5:3000'],
        ['http://localhost:5173', 'localhost:5173'],
      ] as const) {
        const req = request(server.app).get('/api/health');
        if (origin) req.set('Origin', origin);
        if (host) req.set('Host', host);
        const res = await req;
        expect(res.status, `${origin} ${host}`).toBe(200);
        // Same origin needs no CORS header, so none is sent.
        expect(res.headers['access-control-allow-origin']).toBeUndefined();
      }
    });

    it('compares whole origins: scheme, host and port', () => {
      const publicUrl = 'https://holdline.site.example';
      const rows: [origin: string | undefined, host: string | undefined, allowed: boolean][] = [
        [undefined, 'anything:1', true],
        ['https://holdline.site.example', 'localhost:3000', true],
        ['https://holdline.site.example:443', 'localhost:3000', true],
        ['http://holdline.site.example', 'localhost:3000', false],
        ['https://holdline.site.example:8443', 'localhost:3000', false],
        ['https://holdline.site.example.another-site.example', 'localhost:3000', false],
        ['https://sub.holdline.site.example', 'localhost:3000', false],
        ['http://10.0.0.7', '10.0.0.7', true],
        ['http://10.0.0.7:80', '10.0.0.7', true],
        ['http://10.0.0.7:3000', '10.0.0.7:3001', false],
        ['http://10.0.0.7:3000', undefined, false],
        ['null', 'localhost:3000', false],
        ['file://', 'localhost:3000', false],
        ['chrome-extension://abc', 'abc', false],
        ['not a url', 'localhost:3000', false],
        [FOREIGN, 'localhost:3000', false],
      ];
      expect(rows.filter(([origin, host, allowed]) => originAllowed(origin, host, publicUrl) !== allowed)).toEqual([]);
    });
  });

  describe('which origins may open the live board socket', () => {
    const attempt = (transport: 'websocket' | 'polling', origin?: string) =>
      new Promise<'connected' | string>((resolve) => {
        const socket = connect(server.url, {
          transports: [transport],
          auth: { token: person.token },
          reconnection: false,
          forceNew: true,
          timeout: 5000,
          ...(origin ? { extraHeaders: { Origin: origin } } : {}),
        });
        socket.once('connect', () => {
          socket.close();
          resolve('connected');
        });
        socket.once('connect_error', (error: Error & { description?: unknown }) => {
          socket.close();
          resolve(`refused: ${error.message} ${String((error.description as { message?: string })?.message ?? error.description ?? '')}`);
        });
      });

    it('refuses a handshake from another site on either transport', async () => {
      expect(await attempt('websocket', FOREIGN)).toMatch(/^refused/);
      expect(await attempt('polling', FOREIGN)).toMatch(/^refused/);
    });

    it('accepts no Origin and the public address', async () => {
      expect(await attempt('websocket')).toBe('connected');
      expect(await attempt('websocket', server.url)).toBe('connected');
      expect(await attempt('polling', server.url)).toBe('connected');
    });

    it('says why in the refused handshake, with no Access-Control-Allow-Origin', async () => {
      const polling = await request(server.url)
        .get('/socket.io/?EIO=4&transport=polling')
        .set('Origin', FOREIGN);
      expect(polling.status).toBe(403);
      expect(polling.body).toEqual({ code: 4, message: `Requests from another website are not accepted. Open Holdline at ${server.url}.` });
      expect(polling.headers['access-control-allow-origin']).toBeUndefined();

      const upgrade = await new Promise<{ status: number | undefined; body: string }>((resolve, reject) => {
        const req = http.request(`${server.url}/socket.io/?EIO=4&transport=websocket`, {
          headers: { Origin: FOREIGN, Connection: 'Upgrade', Upgrade: 'websocket', 'Sec-WebSocket-Version': '13', 'Sec-WebSocket-Key': 'dGhlIHNhbXBsZSBub25jZQ==' },
        });
        req.on('upgrade', () => reject(new Error('the upgrade was accepted')));
        req.on('response', (res) => {
          let body = '';
          res.on('data', (chunk: Buffer) => (body += chunk.toString()));
          res.on('end', () => resolve({ status: res.statusCode, body }));
        });
        req.on('error', reject);
        req.end();
      });
      expect(upgrade.status).toBe(400);
      expect(upgrade.body).toContain('Requests from another website are not accepted.');
    });
  });
});
