import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sessionSchema } from '../../../shared/schemas/auth.js';
import { userEnvelopeSchema } from '../../../shared/schemas/users.js';
import { signedInUser, type SignedInUser } from '../../helpers/auth.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

describe('a person picks their own units (PATCH /api/users/:id/preferences)', () => {
  let server: TestServer;
  let rigger: SignedInUser;
  let admin: SignedInUser;
  const as = (who: SignedInUser) => ({ Authorization: `Bearer ${who.token}` });
  const path = (who: SignedInUser) => `/api/users/${who.user.id}/preferences`;

  beforeAll(async () => {
    server = await startTestServer();
    rigger = await signedInUser(server, { qualifications: ['rigger'] });
    admin = await signedInUser(server, { isAdmin: true, qualifications: [] });
  });
  afterAll(() => server.stop());

  it('is metric until changed, then US customary in every answer that carries the person, the session included', async () => {
    expect(userEnvelopeSchema.parse((await request(server.app).get(`/api/users/${rigger.user.id}`).set(as(rigger)).expect(200)).body).user.units).toBe('metric');
    const changed = userEnvelopeSchema.parse((await request(server.app).patch(path(rigger)).set(as(rigger)).send({ units: 'us' }).expect(200)).body);
    expect(changed.user.units).toBe('us');
    expect((await request(server.app).get('/api/auth/me').set(as(rigger)).expect(200)).body.user.units).toBe('us');
    const refreshed = sessionSchema.parse((await request(server.app).post('/api/auth/refresh').set('Cookie', rigger.cookie).expect(200)).body);
    expect(refreshed.user.units).toBe('us');
    await request(server.app).patch(path(rigger)).set(as(rigger)).send({ units: 'metric' }).expect(200);
  });

  it('refuses a system it does not know, an empty change and any other field, naming the field', async () => {
    const bad = await request(server.app).patch(path(rigger)).set(as(rigger)).send({ units: 'imperial' }).expect(400);
    expect(bad.body.error.code).toBe('validation');
    expect(bad.body.error.fields).toEqual([{ path: 'units', message: 'Choose metric or US customary units' }]);
    expect((await request(server.app).patch(path(rigger)).set(as(rigger)).send({}).expect(400)).body.error.code).toBe('validation');
    // Settings are not rights: a qualification or the admin flag never rides along.
    const sneak = await request(server.app).patch(path(rigger)).set(as(rigger)).send({ units: 'us', isAdmin: true }).expect(400);
    expect(sneak.body.error.code).toBe('validation');
    expect((await request(server.app).get(`/api/users/${rigger.user.id}`).set(as(rigger)).expect(200)).body.user).toMatchObject({ isAdmin: false, units: 'metric' });
  });

  it("is the person's own: an administrator changes their own units without a second one, never someone else's", async () => {
    expect((await request(server.app).patch(path(admin)).set(as(admin)).send({ units: 'us' }).expect(200)).body.user.units).toBe('us');
    expect((await request(server.app).patch(path(rigger)).set(as(admin)).send({ units: 'us' }).expect(403)).body.error.code).toBe('forbidden');
    await request(server.app).patch(path(rigger)).send({ units: 'us' }).expect(401);
  });
});
