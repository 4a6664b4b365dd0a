import { mount } from '@vue/test-utils';
import { describe, expect, it } from 'vitest';
import type { UserDto } from '../../../../shared/schemas/users';
import EditPersonDialog from '../../../../src/components/people/EditPersonDialog.vue';
import { usePeopleStore } from '../../../../src/stores/people';
import { SELF_CHANGE_WORDS } from '../../../../src/words/people';
import { mockFetchWithStores } from '../../api-fakes';

/** Quasar's package resolves to its server build under happy-dom: its controls are stood in for by plain elements. */
const stubs = {
  'q-dialog': { template: '<div><slot /></div>' },
  'q-card': { template: '<div><slot /></div>' },
  'q-card-section': { template: '<div><slot /></div>' },
  'q-card-actions': { template: '<div><slot /></div>' },
  'q-form': { template: '<form><slot /></form>' },
  'q-input': true,
  'q-toggle': { props: ['modelValue', 'label'], emits: ['update:modelValue'], template: `<input type="checkbox" :aria-label="label" :checked="modelValue" @change="$emit('update:modelValue', !modelValue)" />` },
  'q-icon': true,
  'q-separator': true,
  'q-btn': { props: ['label', 'disable', 'disabled', 'loading', 'type'], template: `<button :type="type || 'button'" :disabled="disable || disabled || loading">{{ label }}</button>` },
  QualificationPicker: true,
  PersonStatusBadge: true,
};

/** What the dialog reads of Quasar's `$q`: the screen size (its notifications and dialogs are not reached here). */
const quasar = { screen: { lt: { sm: false } } };

const admin: UserDto = {
  id: 'b2b2b2b2-0000-4000-8000-000000000001',
  email: 'office@example.test',
  displayName: 'Tamsin Vale',
  qualifications: [],
  isAdmin: true,
  active: true,
  canInspect: false,
  hasPassword: true,
  createdAt: '2026-10-01T07:00:00.000Z',
  units: 'metric',
};
const other: UserDto = { ...admin, id: 'b2b2b2b2-0000-4000-8000-000000000002', email: 'yard@example.test', displayName: 'Gus Arden', isAdmin: false };

function dialogFor(person: UserDto, selfId: string) {
  usePeopleStore().people = [admin, other];
  return mount(EditPersonDialog, { props: { modelValue: true, personId: person.id, selfId }, global: { stubs, directives: { 'close-popup': {} }, provide: { _q_: quasar } } });
}

describe('editing a person on the people screen', () => {
  mockFetchWithStores();

  /** Ticks the inspection mark, a change the Save button then offers to send. */
  async function tickInspection(wrapper: ReturnType<typeof dialogFor>) {
    await wrapper.find('input[aria-label="Qualified to inspect cranes"]').trigger('change');
    return wrapper.findAll('button').find((b) => b.text() === 'Save changes')!;
  }

  it('leaves an administrator’s own account to another administrator, and says why', async () => {
    const wrapper = dialogFor(admin, admin.id);
    expect(wrapper.text()).toContain(SELF_CHANGE_WORDS);
    expect((await tickInspection(wrapper)).attributes('disabled')).toBeDefined();
  });

  it('offers the change on someone else’s account, with no such note', async () => {
    const wrapper = dialogFor(other, admin.id);
    expect(wrapper.text()).not.toContain(SELF_CHANGE_WORDS);
    expect((await tickInspection(wrapper)).attributes('disabled')).toBeUndefined();
  });
});
