import { mount } from '@vue/test-utils';
import { describe, expect, it, vi } from 'vitest';
import type { AsBuilt } from '../../../../shared/schemas/fleet';
import type { JobSummary } from '../../../../shared/schemas/jobs';
import AsBuiltPanel from '../../../../src/components/fleet/AsBuiltPanel.vue';
import { useSessionStore } from '../../../../src/stores/session';
import { JOB_ID, UNIT_ID, json, mockFetchWithStores } from '../../api-fakes';

/** Quasar's package resolves to its server build under happy-dom: its icon is stood in for; a link shows where it goes. */
const stubs = {
  'q-icon': true,
  'router-link': { props: ['to'], template: '<a data-testid="job-link" :data-to="JSON.stringify(to)"><slot /></a>' },
};

const asBuilt: AsBuilt = {
  jobId: JOB_ID,
  jobName: 'Boom erection for the pump house',
  site: 'Riverside works',
  kind: 'erection',
  completedAt: '2026-12-01T15:00:00.000Z',
  planVersion: 2,
  boomLengthM: 21,
  hookBlockId: null,
  parts: null,
  controllerValues: {},
  serials: [],
};

const line = (id: string): JobSummary => ({
  id,
  name: 'A job',
  site: 'Somewhere',
  craneUnitId: UNIT_ID,
  craneFleetNumber: 'CC-11',
  kind: 'erection',
  state: 'complete',
  timeZone: 'UTC',
  planVersion: 1,
  updatedAt: '2026-12-01T15:00:00.000Z',
  myRoles: ['supervisor'],
});

/** Signs a made-up person in on the session store (only the admin flag is read here). */
function signIn(isAdmin: boolean) {
  const session = useSessionStore();
  session.user = { id: 'u1', email: 'p@crew.test', displayName: 'Pat Doyle', qualifications: ['supervisor'], isAdmin } as unknown as typeof session.user;
}

describe('the as-built panel’s link to the job', () => {
  const fetchMock = mockFetchWithStores();

  it('is not offered to a supervisor whose own job list does not hold the job (they may not read it): the name shows unlinked', async () => {
    signIn(false);
    fetchMock.mockResolvedValue(json(200, { items: [line('00000000-0000-4000-8000-0000000000aa')] }));
    const wrapper = mount(AsBuiltPanel, { props: { asBuilt }, global: { stubs } });
    await vi.waitFor(() => expect(fetchMock.mock.calls.map((c) => String(c[0]))).toEqual([expect.stringMatching(/\/api\/jobs$/)]));
    await new Promise((r) => setTimeout(r, 20));
    expect(wrapper.find('[data-testid="job-link"]').exists()).toBe(false);
    expect(wrapper.text()).toContain('Boom erection for the pump house');
  });

  it('links the job for a person in its crew (it is in their job list)', async () => {
    signIn(false);
    fetchMock.mockResolvedValue(json(200, { items: [line(JOB_ID)] }));
    const wrapper = mount(AsBuiltPanel, { props: { asBuilt }, global: { stubs } });
    await vi.waitFor(() => expect(wrapper.find('[data-testid="job-link"]').exists()).toBe(true));
    expect(JSON.parse(wrapper.get('[data-testid="job-link"]').attributes('data-to')!)).toEqual({ name: 'job', params: { id: JOB_ID } });
  });

  it('links the job for an administrator without asking for the list', async () => {
    signIn(true);
    const wrapper = mount(AsBuiltPanel, { props: { asBuilt }, global: { stubs } });
    expect(wrapper.find('[data-testid="job-link"]').exists()).toBe(true);
    await new Promise((r) => setTimeout(r, 20));
    expect(fetchMock).not.toHaveBeenCalled();
  });
});
