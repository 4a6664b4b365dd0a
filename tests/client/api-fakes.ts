import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, vi } from 'vitest';
import type { JobDto } from '../../shared/schemas/jobs';

export const JOB_ID = '3d6a1f0e-5b7c-4d8e-9f01-2a3b4c5d6e7f';
export const UNIT_ID = '6f1c2d7e-3a4b-4c5d-8e9f-0a1b2c3d4e5f';

export type FetchArgs = [input: string, init?: RequestInit];

/** A fresh Pinia and a reset fetch mock around every test of the describe block that calls it. */
export function mockFetchWithStores() {
  const fetchMock = vi.fn<(...args: FetchArgs) => Promise<Response>>();
  beforeEach(() => {
    setActivePinia(createPinia());
    fetchMock.mockReset();
    vi.stubGlobal('fetch', fetchMock);
  });
  afterEach(() => {
    vi.unstubAllGlobals();
  });
  return fetchMock;
}

/** A JSON answer for a mocked fetch. */
export function json(status: number, body: unknown): Response {
  return new Response(JSON.stringify(body), { status, headers: { 'Content-Type': 'application/json' } });
}

/** A job as the API presents it, in planning; override any field. */
export function buildJob(overrides: Partial<JobDto> = {}): JobDto {
  return {
    id: JOB_ID,
    name: 'Boom erection for the pump house',
    site: 'Riverside works',
    craneUnitId: UNIT_ID,
    craneFleetNumber: 'CC-11',
    kind: 'erection',
    state: 'planning',
    timeZone: 'Europe/Warsaw',
    configuration: null,
    figures: [],
    crew: [],
    distribution: [],
    holdReminderMinutes: 10,
    commsPlan: { radioChannel: '', callSigns: [], motionSignallers: [], fallbackHandSignals: '' },
    overrides: [],
    lastSeq: 1,
    headHash: 'abc',
    planVersion: 0,
    createdAt: '2026-10-01T07:00:00.000Z',
    updatedAt: '2026-10-01T07:00:00.000Z',
    can: { edit: true, approveOverrides: true, editCrew: true },
    ...overrides,
  };
}
