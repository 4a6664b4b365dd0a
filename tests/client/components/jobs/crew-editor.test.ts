import { mount } from '@vue/test-utils';
import { describe, expect, it, vi } from 'vitest';
import type { JobDto } from '../../../../shared/schemas/jobs';
import CrewEditor from '../../../../src/components/jobs/CrewEditor.vue';
import { readOnlyNote } from '../../../../src/words/jobs';
import { buildJob, json, mockFetchWithStores } from '../../api-fakes';

/** Quasar's package resolves to its server build under happy-dom: its controls are stood in for by plain elements. */
const stubs = {
  'q-icon': true,
  'q-btn': { props: ['label', 'disable', 'loading', 'type'], template: `<button :type="type || 'button'" :disabled="disable || loading">{{ label }}</button>` },
  'q-select': { props: ['modelValue', 'options', 'label'], template: '<select :aria-label="label"></select>' },
  'q-form': { template: '<form><slot /></form>' },
  RequiredRoles: true,
  ActingSupervisorTransfer: true,
};

const crew: JobDto['crew'] = [
  { userId: 'a1a1a1a1-0000-4000-8000-000000000001', name: 'Rhys Caddel', role: 'supervisor' },
  { userId: 'a1a1a1a1-0000-4000-8000-000000000002', name: 'Ona Brisk', role: 'operator' },
];

describe('the crew tab past planning', () => {
  const fetchMock = mockFetchWithStores();

  it('offers the crew change on a live job when the server says this person may make it, and says the plan is locked', async () => {
    fetchMock.mockResolvedValue(json(200, { items: [] }));
    const job = buildJob({ state: 'live', crew, planVersion: 1, can: { edit: false, approveOverrides: false, editCrew: true } });
    const wrapper = mount(CrewEditor, { props: { job }, global: { stubs } });
    const buttons = wrapper.findAll('button').map((b) => b.text());
    expect(buttons).toContain('Save crew');
    expect(buttons.filter((b) => b === 'Remove')).toHaveLength(2);
    expect(wrapper.find('form').exists()).toBe(true);
    // The people to choose from are asked for only when the crew can be changed.
    await vi.waitFor(() => expect(fetchMock.mock.calls.map((c) => String(c[0]))).toEqual([expect.stringContaining('/crew-candidates')]));
    expect(readOnlyNote(job)).toEqual({ text: 'The plan is locked; the crew can still be changed by the job’s supervisors.', crewEditable: true });
  });

  it('shows the crew read-only, and says so, when the server says this person may not change it', async () => {
    const job = buildJob({ state: 'live', crew, planVersion: 1, can: { edit: false, approveOverrides: false, editCrew: false } });
    const wrapper = mount(CrewEditor, { props: { job }, global: { stubs } });
    expect(wrapper.findAll('button')).toHaveLength(0);
    expect(wrapper.find('form').exists()).toBe(false);
    expect(wrapper.text()).toContain('Rhys Caddel');
    await new Promise((r) => setTimeout(r, 50));
    expect(fetchMock).not.toHaveBeenCalled();
    expect(readOnlyNote(job)).toEqual({ text: 'Read only: the job is live, past planning.', crewEditable: false });
  });

  it('words the note for every case of the server’s flags', () => {
    expect(readOnlyNote(buildJob())).toBeNull();
    expect(readOnlyNote(buildJob({ can: { edit: false, approveOverrides: false, editCrew: false } }))?.text).toBe('Read only: the job’s supervisors change the plan.');
    expect(readOnlyNote(buildJob({ state: 'made_safe', can: { edit: false, approveOverrides: false, editCrew: true } }))?.text).toBe('The plan is locked; the crew can still be changed by the job’s supervisors.');
    expect(readOnlyNote(buildJob({ state: 'complete', can: { edit: false, approveOverrides: false, editCrew: false } }))?.text).toBe('Read only: the job is complete, past planning.');
  });
});
