import request from 'supertest';
import { io as connect } from 'socket.io-client';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { policyTable, type PolicyRow, type Subject } from '../../../server/policies/index.js';
import { signedInUser, type SignedInUser } from '../../helpers/auth.js';
import { seedModelAndUnit } from '../../helpers/fleet.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

type ActorName = 'anonymous' | 'rigger' | 'supervisor' | 'viewer' | 'admin';

/**
 * Reads the policy table and calls every route of every row as every kind of person: an
 * admitted person never gets 401/403, anyone else gets 401 (not signed in) or 403.
 */
describe('the policy table against the real routes', () => {
  let server: TestServer;
  const actors = {} as Record<Exclude<ActorName, 'anonymous'>, SignedInUser>;
  let other: SignedInUser;
  let jobId: string;

  beforeAll(async () => {
    server = await startTestServer();
    actors.rigger = await signedInUser(server, { qualifications: ['rigger'] });
    actors.supervisor = await signedInUser(server, { qualifications: ['supervisor'] });
    actors.viewer = await signedInUser(server, { qualifications: ['viewer'] });
    actors.admin = await signedInUser(server, { qualifications: [], isAdmin: true });
    other = await signedInUser(server, { qualifications: ['operator'] });
    // A job the supervisor created (and so supervises); nobody else is on its crew.
    const { unit } = await seedModelAndUnit(server, actors.admin.token);
    const job = await request(server.app).post('/api/jobs').set('Authorization', `Bearer ${actors.supervisor.token}`).send({ name: 'Policy job', site: 'Test site', craneUnitId: unit.id, kind: 'erection' }).expect(201);
    jobId = job.body.job.id as string;
  });
  afterAll(() => server.stop());

  function admitted(allow: readonly Subject[], actor: SignedInUser | null, targetUserId: string | undefined, onJob: boolean): boolean {
    // Only the supervisor who created the job is on its crew, as its supervisor.
    const crewRoles = onJob && actor === actors.supervisor ? ['supervisor'] : [];
    return allow.some((subject) => {
      if (subject === 'anyone') return true;
      if (!actor) return false;
      if (subject === 'signed_in') return true;
      if (subject === 'admin') return actor.user.isAdmin;
      if (subject === 'self') return targetUserId === actor.user.id;
      if (subject === 'crew:any') return crewRoles.length > 0;
      if (subject.startsWith('crew:')) return crewRoles.includes(subject.slice('crew:'.length));
      return actor.user.qualifications.includes(subject.slice('qualification:'.length) as never);
    });
  }

  interface Case { row: PolicyRow; route: string; actorName: ActorName; target: 'self' | 'other' | 'none' }
  const rows: readonly PolicyRow[] = policyTable;
  const actorNames: ActorName[] = ['anonymous', 'rigger', 'supervisor', 'viewer', 'admin'];
  const cases: Case[] = [];
  for (const row of rows) {
    for (const route of row.routes) {
      for (const actorName of actorNames) {
        const targets: Case['target'][] = route.includes(':userId') ? ['self', 'other'] : ['none'];
        for (const target of targets) cases.push({ row, route, actorName, target });
      }
    }
  }

  it('guards a route or a socket event with every row', () => {
    expect(rows.filter((r) => r.routes.length === 0 && !r.events?.length).map((r) => r.action)).toEqual([]);
  });

  it.each(cases)('$row.action: $route as $actorName ($target)', async ({ row, route, actorName, target }) => {
    const actor = actorName === 'anonymous' ? null : actors[actorName];
    const targetUserId = target === 'self' ? (actor?.user.id ?? other.user.id) : target === 'other' ? other.user.id : undefined;
    const [method, pattern] = route.split(' ') as [string, string];
    // Other ids point at nothing: an admitted person then gets 404 (or 400), never 401/403.
    const path = pattern
      .replace(':userId', targetUserId ?? '')
      .replace(':jobId', jobId)
      .replace(/:[a-zA-Z]+Id/g, '00000000-0000-4000-8000-000000000000');
    let req = request(server.app)[method.toLowerCase() as 'get' | 'post' | 'patch' | 'put' | 'delete'](path);
    if (actor) req = req.set('Authorization', `Bearer ${actor.token}`);
    if (method !== 'GET') req = req.send({});
    const res = await req;
    if (admitted(row.allow, actor, targetUserId, pattern.includes(':jobId'))) {
      // A route that checks a proof the request carries (here: none) refuses for want of that
      // proof, in its own words; the table itself never refuses an admitted person.
      if (row.proof) expect(res.body.error?.code ?? '').not.toMatch(/^(unauthenticated|forbidden)$/);
      else expect([401, 403]).not.toContain(res.status);
    } else {
      expect(res.status).toBe(actor ? 403 : 401);
      expect(res.body.error.code).toMatch(actor ? /^forbidden$/ : /^unauthenticated$/);
    }
  });

  it('socket.connect: signed-in people connect, nobody else does', async () => {
    const tryConnect = (token: string | undefined) =>
      new Promise<string>((resolve) => {
        const socket = connect(server.url, { transports: ['websocket'], auth: token ? { token } : {}, reconnection: false });
        socket.on('connect', () => {
          socket.close();
          resolve('connected');
        });
        socket.on('connect_error', (err) => {
          socket.close();
          resolve(err.message);
        });
      });
    expect(await tryConnect(undefined)).toBe('unauthenticated');
    expect(await tryConnect('not-a-token')).toBe('unauthenticated');
    for (const actor of Object.values(actors)) expect(await tryConnect(actor.token)).toBe('connected');
  });
});
