import { createPinia, setActivePinia } from 'pinia';
import { describe, expect, it, vi } from 'vitest';
import type { Configuration, Figure } from '../../../shared/schemas/configuration';
import type { JobDto } from '../../../shared/schemas/jobs';
import type { JobEventDto } from '../../../shared/events/log';
import { fieldErrorOf } from '../../../src/stores/form-errors';
import { figureDifferences, useJobsStore } from '../../../src/stores/jobs';
import { buildJob, JOB_ID, json, mockFetchWithStores, UNIT_ID, type FetchArgs } from '../api-fakes';

const SUPERVISOR_ID = '0b9a8c7d-6e5f-4a3b-9c2d-1e0f9a8b7c6d';

function configuration(overrides: Partial<Configuration> = {}): Configuration {
  return {
    craneUnitId: UNIT_ID,
    boomLengthM: 18,
    mainHook: { hookBlockId: 'HB120', parts: 6, lowestHookPositionM: 0 },
    auxiliary: { enabled: false, hookBlockId: null },
    heaviestLoad: { description: 'Roof truss', loadT: 20, riggingT: 0.8, radiusM: 8 },
    ground: { groundType: 'firm clay', allowablePressureKpa: 400, source: { kind: 'ground_investigation', reference: 'GI report X-1', designer: '' } },
    mats: { used: false, lengthM: 5, widthM: 1.2, thicknessM: 0.3, weightKg: 1100 },
    assist: {
      assistCraneId: null,
      chartId: null,
      lifts: [],
      pads: { kind: 'outrigger', loadT: null, lengthM: null, widthM: null, weightKg: 0 },
      tandem: { alongFromTipM: null, sideM: null, releaseAngleDeg: null, hookBlockT: 0, slingsT: 0, shacklesT: 0, deductionsT: 0 },
    },
    siteHazards: { powerLines: [], buriedServices: '', neighbours: '', loadAndTagLineAllowanceM: 3, swayAllowanceM: 2 },
    fallZoneMarginM: 5,
    chartCautionPercent: 75,
    weatherFreshMinutes: 15,
    ...overrides,
  };
}

function figure(overrides: Partial<Figure>): Figure {
  return { key: 'rope.leadLinePull', group: 'rope', label: 'Lead-line pull', value: '47.4 kN of 130 kN permissible', status: 'pass', overridable: false, rule: 'a rule', ...overrides };
}

function job(overrides: Partial<JobDto> = {}): JobDto {
  return buildJob({ crew: [{ userId: SUPERVISOR_ID, name: 'Maren Holt', role: 'supervisor' }], ...overrides });
}


describe('jobs store', () => {
  const fetchMock = mockFetchWithStores();

  it('keeps every field error of a save the server refused, and keeps the saved job as it was', async () => {
    const jobs = useJobsStore();
    fetchMock.mockResolvedValueOnce(json(200, { job: job() }));
    await jobs.loadJob(JOB_ID);

    fetchMock.mockResolvedValueOnce(
      json(400, {
        error: {
          code: 'validation',
          message: 'The configuration has invalid fields.',
          fields: [
            { path: 'heaviestLoad.radiusM', message: 'Too small: expected number to be >0' },
            { path: 'assist.assistCraneId', message: 'No such assist crane' },
          ],
        },
      }),
    );
    const saved = await jobs.saveConfiguration(JOB_ID, configuration(), []);

    expect(saved).toBeNull();
    const [url, init] = fetchMock.mock.calls[1];
    expect(url).toBe(`/api/jobs/${JOB_ID}/configuration`);
    expect(init?.method).toBe('PUT');
    expect(jobs.forms.configuration.problem).toBe('The configuration has invalid fields.');
    expect(jobs.errorOf('configuration', 'heaviestLoad.radiusM')).toBe('Too small: expected number to be >0');
    expect(jobs.errorOf('configuration', 'assist.assistCraneId')).toBe('No such assist crane');
    // A section heading finds the errors of the fields under it.
    expect(jobs.errorOf('configuration', 'heaviestLoad')).toBe('Too small: expected number to be >0');
    expect(jobs.errorOf('configuration', 'ground.allowablePressureKpa')).toBe('');
    expect(jobs.forms.configuration.saving).toBe(false);
    expect(jobs.details[JOB_ID].configuration).toBeNull();
    // Other forms on the same page are untouched.
    expect(jobs.forms.crew.fieldErrors).toEqual({});
  });

  it('refuses an incomplete configuration on the device, naming the empty field, without asking the server', async () => {
    const jobs = useJobsStore();
    const saved = await jobs.saveConfiguration(JOB_ID, configuration({ heaviestLoad: { description: 'Roof truss', loadT: Number.NaN, riggingT: 0.8, radiusM: 8 } }), []);
    expect(saved).toBeNull();
    expect(fetchMock).not.toHaveBeenCalled();
    expect(jobs.errorOf('configuration', 'heaviestLoad.loadT')).toBe('Enter a number');
    expect(jobs.forms.configuration.problem).toContain('Some fields need fixing');
  });

  it("replaces this device's figures by the server's after a save, and says which ones differed", async () => {
    const jobs = useJobsStore();
    const local = [figure({}), figure({ key: 'boom.makeup', group: 'boom', label: 'Boom make-up', value: '18 m: base, ins3, tip', status: 'pass' })];
    // The server found the make-up no longer buildable (a part quarantined since the page loaded).
    const server = [figure({}), figure({ key: 'boom.makeup', group: 'boom', label: 'Boom make-up', value: 'Not buildable from the parts at hand', status: 'fail' })];
    fetchMock.mockResolvedValueOnce(json(200, { job: job({ configuration: configuration(), figures: server, updatedAt: '2026-10-01T08:00:00.000Z' }) }));
    fetchMock.mockResolvedValue(json(200, { ready: false, reasons: [{ code: 'figure_not_overridable', message: 'Boom make-up fails and can never be overridden.' }] }));

    const saved = await jobs.saveConfiguration(JOB_ID, configuration(), local);

    expect(saved?.figures).toEqual(server);
    expect(jobs.details[JOB_ID].figures).toEqual(server);
    expect(jobs.serverChecks[JOB_ID].differences).toEqual([
      { key: 'boom.makeup', label: 'Boom make-up', local: '18 m: base, ins3, tip (pass)', server: 'Not buildable from the parts at hand (fail)' },
    ]);
    // Readiness follows the save.
    await vi.waitFor(() => expect(jobs.readiness[JOB_ID]?.ready).toBe(false));
    expect(fetchMock.mock.calls.some(([u]) => u === `/api/jobs/${JOB_ID}/readiness`)).toBe(true);
  });

  it('reports no difference when the server agrees, whatever the order of its figures', () => {
    const a = figure({});
    const b = figure({ key: 'wind.assembly', group: 'wind', label: 'Wind limit for assembly', value: 'gust ≤ 14 m/s', status: 'info' });
    expect(figureDifferences([a, b], [b, a])).toEqual([]);
    expect(figureDifferences([a], [a, b])).toEqual([{ key: 'wind.assembly', label: 'Wind limit for assembly', local: null, server: 'gust ≤ 14 m/s (info)' }]);
  });

  it('loads the readiness reasons as the server words them', async () => {
    const jobs = useJobsStore();
    const reasons = [
      { code: 'crew_operator', message: 'The crew has no operator. Add at least one.' },
      { code: 'figure_failing', message: 'Lead-line pull fails (140 kN). Change the configuration, or override it with a reason and a second person’s approval.' },
    ];
    fetchMock.mockResolvedValueOnce(json(200, { ready: false, reasons }));
    await jobs.loadReadiness(JOB_ID);
    expect(fetchMock.mock.calls[0][0]).toBe(`/api/jobs/${JOB_ID}/readiness`);
    expect(jobs.readiness[JOB_ID]).toEqual({ ready: false, reasons });

    fetchMock.mockResolvedValueOnce(json(500, { error: { code: 'internal', message: 'Something went wrong on the server.' } }));
    await jobs.loadReadiness(JOB_ID);
    expect(jobs.problemOf(`readiness:${JOB_ID}`)).toBe('Something went wrong on the server.');
    // The last known reasons stay on screen beside the problem.
    expect(jobs.readiness[JOB_ID].reasons).toHaveLength(2);
  });

  it('keeps crew errors on the row the server named', async () => {
    const jobs = useJobsStore();
    fetchMock.mockResolvedValueOnce(
      json(400, { error: { code: 'validation', message: 'Some crew assignments are not possible.', fields: [{ path: 'members.1.role', message: 'Ola Brandt is not qualified as operator' }] } }),
    );
    const result = await jobs.setCrew(JOB_ID, [
      { userId: SUPERVISOR_ID, role: 'supervisor' },
      { userId: UNIT_ID, role: 'operator' },
    ]);
    expect(result).toBeNull();
    expect(jobs.errorOf('crew', 'members.1')).toBe('Ola Brandt is not qualified as operator');
    expect(jobs.errorOf('crew', 'members.0')).toBe('');
  });

  it('treats a refused people list as "cannot choose", not as a failure', async () => {
    const jobs = useJobsStore();
    fetchMock.mockResolvedValueOnce(json(403, { error: { code: 'forbidden', message: 'You may not do that.' } }));
    await jobs.loadCandidates();
    expect(jobs.candidatesRefused).toBe(true);
    expect(jobs.problemOf('candidates')).toBe('');
  });

  it('asks only for the events after the last one it holds', async () => {
    const jobs = useJobsStore();
    const event = (seq: number): JobEventDto => ({
      jobId: JOB_ID,
      seq,
      type: 'job.updated',
      at: '2026-10-01T07:00:00.000Z',
      by: { userId: SUPERVISOR_ID, name: 'Maren Holt', role: 'supervisor' },
      data: { changes: { site: 'Pad 3' }, planRegenerated: false },
    });
    fetchMock.mockResolvedValueOnce(json(200, { items: [event(1), event(2)], lastSeq: 2 }));
    await jobs.loadEvents(JOB_ID);
    fetchMock.mockResolvedValueOnce(json(200, { items: [event(3)], lastSeq: 3 }));
    await jobs.loadEvents(JOB_ID);
    expect(fetchMock.mock.calls.map(([u]) => u)).toEqual([`/api/jobs/${JOB_ID}/events?after=0`, `/api/jobs/${JOB_ID}/events?after=2`]);
    expect(jobs.events[JOB_ID].map((e) => e.seq)).toEqual([1, 2, 3]);
  });

  it('finds the message of a field inside a list', () => {
    expect(fieldErrorOf({ 'siteHazards.powerLines.0.voltageKv': 'Enter a number' }, 'siteHazards.powerLines')).toBe('Enter a number');
  });
});

describe('field messages', () => {
  it("keeps a schema's own words and replaces zod's generic ones", async () => {
    setActivePinia(createPinia());
    const fetchMock = vi.fn<(...args: FetchArgs) => Promise<Response>>();
    vi.stubGlobal('fetch', fetchMock);
    const jobs = useJobsStore();
    expect(await jobs.requestOverride(JOB_ID, 'ground.raising', 'Short')).toBeNull();
    expect(jobs.errorOf('override', 'reason')).toBe('Give the reason in a sentence');
    expect(await jobs.saveConfiguration(JOB_ID, configuration({ fallZoneMarginM: -1 }), [])).toBeNull();
    expect(jobs.errorOf('configuration', 'fallZoneMarginM')).toBe('Enter 0 or more');
    expect(fetchMock).not.toHaveBeenCalled();
    vi.unstubAllGlobals();
  });
});
