import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { jobEnvelopeSchema } from '../../../shared/schemas/jobs.js';
import { recordListSchema, type RecordList } from '../../../shared/schemas/records.js';
import { DEMO_PASSWORD } from '../../../server/demo/people.js';
import { seedDemoIfEmpty } from '../../../server/demo/seed.js';
import { CraneUnit } from '../../../server/entities/CraneUnit.js';
import { JobCrew } from '../../../server/entities/JobCrew.js';
import { signedInUser, type SignedInUser } from '../../helpers/auth.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

// Short steps: the access tokens signed in above must stay valid.
const STEP_MS = 60_000;

describe('GET /api/records: the Records screen’s list', () => {
  let server: TestServer;
  const tokens: Record<string, string> = {};
  const ids: Record<string, string> = {};
  let outsider: SignedInUser;
  let trialId: string;
  let extraUnitId: string;
  const extraJobs: { id: string; site: string }[] = [];

  const list = async (token: string, query: Record<string, string | number> = {}): Promise<RecordList> =>
    recordListSchema.parse((await request(server.app).get('/api/records').query(query).set('Authorization', `Bearer ${token}`).expect(200)).body);
  const allRows = async (token: string, query: Record<string, string | number> = {}) => {
    const rows: RecordList['items'] = [];
    for (let page = 1; ; page += 1) {
      const answer = await list(token, { ...query, page, pageSize: 2 });
      rows.push(...answer.items);
      if (rows.length >= answer.total || answer.items.length === 0) return { rows, total: answer.total };
    }
  };

  beforeAll(async () => {
    server = await startTestServer();
    await seedDemoIfEmpty(server.context);
    for (const who of ['admin', 'supervisor', 'supervisor2', 'rigger', 'viewer']) {
      const res = await request(server.app).post('/api/auth/login').send({ email: `${who}@holdline.test`, password: DEMO_PASSWORD }).expect(200);
      tokens[who] = res.body.token as string;
      ids[who] = (res.body.user as { id: string }).id;
    }
    outsider = await signedInUser(server, { qualifications: ['rigger'] });
    const jobs = (await request(server.app).get('/api/jobs').set('Authorization', `Bearer ${tokens.supervisor}`).expect(200)).body.items as { id: string; name: string; craneUnitId: string }[];
    trialId = jobs.find((j) => j.name === 'Depot trial erection, 21 m')!.id;
    const units = await server.context.dataSource.manager.find(CraneUnit);
    extraUnitId = units.find((u) => !jobs.some((j) => j.craneUnitId === u.id))?.id ?? units[0].id;
    // Three more jobs, a minute apart, made by the supervisor alone: the demo rigger is in none of their crews.
    for (const [i, site] of ['Quay 4 (east) 100%_OK', 'Quay 4 (west)', 'Old mill yard'].entries()) {
      server.advance(STEP_MS);
      const res = await request(server.app)
        .post('/api/jobs')
        .set('Authorization', `Bearer ${tokens.supervisor}`)
        .send({ name: `Extra job ${i + 1}`, site, craneUnitId: extraUnitId, kind: 'erection' })
        .expect(201);
      extraJobs.push({ id: jobEnvelopeSchema.parse(res.body).job.id, site });
    }
  }, 180_000);
  afterAll(async () => {
    await server?.stop();
  });

  it('a supervisor sees every job whose crew they are in, newest first, each with its chain verified and its final hash', async () => {
    const { rows, total } = await allRows(tokens.supervisor);
    // The demo's four jobs and the three made here: the demo supervisor is on every one of their crews.
    expect(new Set(rows.map((r) => r.id))).toEqual(new Set((await server.context.dataSource.manager.findBy(JobCrew, { userId: ids.supervisor })).map((c) => c.jobId)));
    expect(total).toBe(7);
    expect(rows.map((r) => r.id).slice(0, 3)).toEqual(extraJobs.map((j) => j.id).reverse());
    const updated = rows.map((r) => r.updatedAt);
    expect(updated).toEqual([...updated].sort().reverse());
    for (const row of rows) {
      expect(row.verification).toMatchObject({ valid: true, firstBadSeq: null, checked: row.lastSeq });
      expect(row.finalHash).toMatch(/^[0-9a-f]{64}$/);
      expect(row.verification.finalHash).toBe(row.finalHash);
    }
    // The same hash as the job's own verify route.
    const verify = (await request(server.app).get(`/api/jobs/${trialId}/record/verify`).set('Authorization', `Bearer ${tokens.supervisor}`).expect(200)).body as { finalHash: string };
    expect(rows.find((r) => r.id === trialId)?.finalHash).toBe(verify.finalHash);
  });

  it('pages are disjoint, cover every job, and the page size is capped at 100', async () => {
    const first = await list(tokens.admin, { page: 1, pageSize: 4 });
    const second = await list(tokens.admin, { page: 2, pageSize: 4 });
    expect(first).toMatchObject({ total: 7, page: 1, pageSize: 4 });
    expect(first.items).toHaveLength(4);
    expect(second.items).toHaveLength(3);
    expect(new Set([...first.items, ...second.items].map((r) => r.id)).size).toBe(7);
    expect((await list(tokens.admin, { page: 3, pageSize: 4 })).items).toEqual([]);
    const refused = await request(server.app).get('/api/records').query({ pageSize: 101 }).set('Authorization', `Bearer ${tokens.admin}`).expect(400);
    expect(refused.body.error.code).toBe('validation');
    await request(server.app).get('/api/records').query({ page: 0 }).set('Authorization', `Bearer ${tokens.admin}`).expect(400);
  });

  it('a rigger, and a supervisor too, sees exactly the jobs whose crew they are in; a person in no crew sees none; nobody signed in is refused', async () => {
    // The second demo supervisor is on the demo jobs' crews, not on the three made here.
    for (const who of ['rigger', 'supervisor2']) {
      const crewJobs = (await server.context.dataSource.manager.findBy(JobCrew, { userId: ids[who] })).map((c) => c.jobId);
      const { rows, total } = await allRows(tokens[who]);
      expect(total, who).toBe(new Set(crewJobs).size);
      expect(total, who).toBeGreaterThan(0);
      expect(new Set(rows.map((r) => r.id)), who).toEqual(new Set(crewJobs));
      expect(rows.some((r) => extraJobs.some((j) => j.id === r.id)), who).toBe(false);
    }
    // A qualified supervisor reads no job by that alone: on no crew, their list is empty, as GET /api/jobs is.
    const idleSupervisor = await signedInUser(server, { qualifications: ['supervisor'] });
    for (const token of [outsider.token, idleSupervisor.token]) {
      expect(await list(token)).toMatchObject({ items: [], total: 0 });
      expect((await request(server.app).get('/api/jobs').set('Authorization', `Bearer ${token}`).expect(200)).body.items).toEqual([]);
    }
    await request(server.app).get('/api/records').expect(401);
  });

  it('filters by state, crane unit, site text and date range', async () => {
    const complete = await list(tokens.supervisor, { state: 'complete' });
    expect(complete.items.map((r) => r.id)).toEqual([trialId]);
    expect(complete.items[0].endedAt).not.toBeNull();

    const byUnit = await list(tokens.supervisor, { craneUnitId: extraUnitId });
    expect(new Set(byUnit.items.map((r) => r.craneUnitId))).toEqual(new Set([extraUnitId]));
    expect(byUnit.total).toBeGreaterThanOrEqual(3);

    // Any case, and LIKE's wildcards typed by a person are plain characters.
    expect((await list(tokens.supervisor, { site: 'quay 4' })).items.map((r) => r.site).sort()).toEqual(['Quay 4 (east) 100%_OK', 'Quay 4 (west)']);
    expect((await list(tokens.supervisor, { site: '100%_ok' })).items.map((r) => r.site)).toEqual(['Quay 4 (east) 100%_OK']);
    expect((await list(tokens.supervisor, { site: '0%k' })).total).toBe(0);

    // The second and third extra jobs, by their last change: inclusive bounds.
    const all = (await list(tokens.supervisor, { pageSize: 100 })).items;
    const second = all.find((r) => r.id === extraJobs[1].id)!;
    const third = all.find((r) => r.id === extraJobs[2].id)!;
    const ranged = await list(tokens.supervisor, { from: second.updatedAt, to: third.updatedAt });
    expect(ranged.items.map((r) => r.id)).toEqual([extraJobs[2].id, extraJobs[1].id]);
    // An offset time is read as the same instant.
    const offset = new Date(Date.parse(second.updatedAt) + 1).toISOString().replace('Z', '+00:00');
    expect((await list(tokens.supervisor, { from: offset, to: third.updatedAt })).items.map((r) => r.id)).toEqual([extraJobs[2].id]);

    // By when the job ended: only the jobs that ended, in that window.
    const endedAt = complete.items[0].endedAt!;
    expect((await list(tokens.supervisor, { dateField: 'ended', from: endedAt, to: endedAt })).items.map((r) => r.id)).toEqual([trialId]);
    expect((await list(tokens.supervisor, { dateField: 'ended' })).items.every((r) => r.endedAt !== null)).toBe(true);
    expect((await list(tokens.supervisor, { dateField: 'ended', to: new Date(Date.parse(endedAt) - 1).toISOString() })).total).toBe(0);

    const backwards = await request(server.app).get('/api/records').query({ from: third.updatedAt, to: second.updatedAt }).set('Authorization', `Bearer ${tokens.supervisor}`).expect(400);
    expect(backwards.body.error.fields.map((f: { path: string }) => f.path)).toContain('to');
    await request(server.app).get('/api/records').query({ state: 'finished' }).set('Authorization', `Bearer ${tokens.supervisor}`).expect(400);
    // Empty filter fields (as a form sends them) mean no filter.
    expect((await list(tokens.supervisor, { state: '', site: '', craneUnitId: '' })).total).toBe(7);
  });

  it('a stored event changed behind the server shows as a broken chain at that event, on that row only', async () => {
    const { manager } = server.context.dataSource;
    const victim = extraJobs[0].id;
    await server.context.queue.run(() => manager.query(`UPDATE job_event SET data = json_set(data, '$.job.site', 'Somewhere else') WHERE job_id = ? AND seq = 1`, [victim]));
    const rows = (await list(tokens.supervisor, { pageSize: 100 })).items;
    const broken = rows.find((r) => r.id === victim)!;
    expect(broken.verification).toMatchObject({ valid: false, firstBadSeq: 1, finalHash: null, checked: 0 });
    // The stored head is still shown, so it can be compared with a copy on paper.
    expect(broken.finalHash).toMatch(/^[0-9a-f]{64}$/);
    expect(rows.filter((r) => r.id !== victim).every((r) => r.verification.valid)).toBe(true);
  });
});
