import { Router } from 'express';
import { Server } from 'socket.io';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { z } from 'zod';
import { policyTable, type PolicyRow } from '../../../server/policies/index.js';
import type { HoldlineServer, HoldlineSocket } from '../../../server/sockets/auth.js';
import { attachSockets } from '../../../server/sockets/index.js';
import { BoardPublisher } from '../../../server/sockets/publisher.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

/**
 * Every route the real app registers and every event the socket modules listen to has a row in
 * the policy table (server/policies/index.ts), and every row names only routes and events that
 * exist. tests/server/policies/access-matrix.test.ts then calls every route as every kind of person.
 */
const rows: readonly PolicyRow[] = policyTable;

const layerSchema = z.object({
  route: z.object({ path: z.unknown(), methods: z.record(z.string(), z.unknown()) }).optional(),
  rawPath: z.unknown().optional(),
  handle: z.unknown(),
});

/** `METHOD /path` of every route in an Express 5 router stack, mounted routers included. */
function routesOf(stack: readonly unknown[], prefix = ''): string[] {
  const out: string[] = [];
  for (const entry of stack) {
    const layer = layerSchema.parse(entry);
    if (layer.route) {
      const { path, methods } = layer.route;
      // A pattern that is not a plain path (a RegExp) cannot be matched to a row: name it so the test fails.
      const shown = typeof path === 'string' ? path : `<pattern ${String(path)}>`;
      for (const method of Object.keys(methods).filter((m) => methods[m])) out.push(`${method === '_all' ? 'ALL' : method.toUpperCase()} ${prefix}${shown}`);
      continue;
    }
    const { handle } = layer;
    if (typeof handle === 'function' && 'stack' in handle && Array.isArray(handle.stack)) {
      const mount = typeof layer.rawPath === 'string' && layer.rawPath !== '/' ? layer.rawPath : '';
      out.push(...routesOf(handle.stack, prefix + mount));
    }
  }
  return out;
}

/** Socket.IO raises these itself; no client can send them, so they need no row. */
const socketLifecycle = new Set(['disconnect', 'disconnecting']);

/** The events the socket modules listen to for each connection, plus `connect` when a handshake check is installed. */
function registeredEvents(server: TestServer): string[] {
  const io: HoldlineServer = new Server({ serveClient: false });
  const use = vi.spyOn(io, 'use');
  const stop = attachSockets(io, server.context, new BoardPublisher(io));
  stop();
  const names: string[] = use.mock.calls.length ? ['connect'] : [];
  // A stand-in socket that only records what is listened to; registering touches nothing else.
  const recorder = {
    on(name: string) {
      names.push(name);
      return recorder;
    },
    // The input guard's per-message middleware (server/sockets/limits.ts) listens to no event.
    use() {
      return recorder;
    },
  };
  for (const onConnection of io.listeners('connection')) onConnection(recorder as unknown as HoldlineSocket);
  // Never attached to an HTTP server, so there is nothing to close.
  return names.filter((n) => !socketLifecycle.has(n));
}

const difference = (a: readonly string[], b: readonly string[]) => [...new Set(a)].filter((x) => !b.includes(x)).sort();

describe('the policy table covers the app', () => {
  let server: TestServer;
  beforeAll(async () => {
    server = await startTestServer();
  });
  afterAll(() => server.stop());

  const tableRoutes = rows.flatMap((r) => r.routes);
  const tableEvents = rows.flatMap((r) => r.events ?? []);

  it('has a row for every registered route', () => {
    const routes = routesOf(server.app.router.stack);
    expect(routes).toContain('POST /api/jobs/:jobId/commands');
    expect(difference(routes, tableRoutes)).toEqual([]);
  });

  it('names no route the app does not have', () => {
    expect(difference(tableRoutes, routesOf(server.app.router.stack))).toEqual([]);
  });

  it('names each route and event in one row only', () => {
    expect(tableRoutes.length).toBe(new Set(tableRoutes).size);
    expect(tableEvents.length).toBe(new Set(tableEvents).size);
  });

  it('has a row for every socket event, and names no event nobody listens to', () => {
    const events = registeredEvents(server);
    expect(events).toEqual(expect.arrayContaining(['connect', 'board:command']));
    expect(difference(events, tableEvents)).toEqual([]);
    expect(difference(tableEvents, events)).toEqual([]);
  });

  it('catches a route added without a row', () => {
    const extra = Router();
    extra.get('/jobs/:jobId/unlisted', (_req, res) => {
      res.end();
    });
    server.app.use('/api', extra);
    expect(difference(routesOf(server.app.router.stack), tableRoutes)).toEqual(['GET /api/jobs/:jobId/unlisted']);
  });
});
