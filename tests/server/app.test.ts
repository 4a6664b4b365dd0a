import { mkdtempSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { healthSchema } from '../../shared/schemas/health.js';
import { apiErrorSchema } from '../../shared/schemas/errors.js';
import { startTestServer, type TestServer } from '../helpers/server.js';

describe('HTTP basics', () => {
  let server: TestServer;
  let clientDir: string;

  beforeAll(async () => {
    server = await startTestServer();
    clientDir = mkdtempSync(path.join(os.tmpdir(), 'holdline-client-'));
    writeFileSync(path.join(clientDir, 'index.html'), '<!doctype html><title>Holdline</title><div id="app"></div>');
  });
  afterAll(() => server.stop());

  it('answers the health check with status, version, database and a storage that has had no fault', async () => {
    const res = await request(server.app).get('/api/health').expect(200);
    expect(healthSchema.parse(res.body)).toEqual({
      status: 'ok',
      version: expect.stringMatching(/^\d+\.\d+\.\d+/),
      database: 'ok',
      storage: { ok: true, since: null, lastFault: null, clearedAt: null },
    });
  });

  it('answers an unknown API route with a 404 JSON error', async () => {
    const res = await request(server.app).post('/api/nope').expect(404);
    expect(res.type).toBe('application/json');
    expect(apiErrorSchema.parse(res.body).error.code).toBe('not_found');
  });

  it('answers malformed JSON with a 400 JSON error and no stack trace', async () => {
    const res = await request(server.app).post('/api/health').set('Content-Type', 'application/json').send('{"a":').expect(400);
    expect(res.body).toEqual({ error: { code: 'malformed_json', message: 'The request body is not valid JSON.' } });
    expect(res.text).not.toMatch(/at .*\.js/);
  });

  it('answers an oversized body with a 413 JSON error', async () => {
    const res = await request(server.app).post('/api/health').set('Content-Type', 'application/json').send(JSON.stringify({ a: 'x'.repeat(2_000_000) })).expect(413);
    expect(res.body.error.code).toBe('too_large');
  });

  it('serves index.html for client routes and not for API routes', async () => {
    const { createApp } = await import('../../server/app.js');
    const { openDatabase } = await import('../../server/db/data-source.js');
    const { createLogger } = await import('../../server/logger.js');
    const dataSource = await openDatabase(path.join(clientDir, 'db.sqlite'));
    const withClient = createApp({ config: server.config, dataSource, logger: createLogger('silent'), clientDir });
    try {
      const page = await request(withClient.app).get('/jobs').expect(200);
      expect(page.type).toBe('text/html');
      expect(page.text).toContain('<div id="app">');
      const deep = await request(withClient.app).get('/jobs/123/cab').expect(200);
      expect(deep.text).toContain('<div id="app">');
      await request(withClient.app).get('/api/jobs-that-do-not-exist').expect(404).expect('Content-Type', /json/);
    } finally {
      await withClient.close();
    }
  });

  it('sends security headers without upgrading plain-http site networks', async () => {
    const res = await request(server.app).get('/api/health');
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['content-security-policy']).toContain("default-src 'self'");
    expect(res.headers['content-security-policy']).not.toContain('upgrade-insecure-requests');
  });
});
