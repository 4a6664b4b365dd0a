// Boards for the shift screens' tests, built by the real reducer from events that go through the
// log's own schema (tests/shared/board/events.ts): a live job on the small hand-written plan, its
// shift ended, its make-safe items ticked, a handover written and acknowledged.
import { createPinia, setActivePinia } from 'pinia';
import { applyEvent, replay } from '../../../../../shared/board/apply';
import { makeSafeChecklist } from '../../../../../shared/board/shifts';
import type { BoardSnapshot, BoardState } from '../../../../../shared/board/types';
import type { JobEventType } from '../../../../../shared/events/log';
import type { UserDto } from '../../../../../shared/schemas/users';
import { useBoardStore } from '../../../../../src/stores/board';
import { useSessionStore } from '../../../../../src/stores/session';
import { smallPlan, testWindLimits } from '../../../../shared/board/board-plan';
import { eventLog, people, type TestData, type Who } from '../../../../shared/board/events';

export { people };

export const crew: BoardState['crew'] = [
  { userId: people.sue.userId, name: people.sue.name, role: 'supervisor' },
  { userId: people.otto.userId, name: people.otto.name, role: 'operator' },
  { userId: people.rita.userId, name: people.rita.name, role: 'rigger' },
  { userId: people.sam.userId, name: people.sam.name, role: 'signaller' },
  { userId: people.ned.userId, name: people.ned.name, role: 'supervisor' },
];

/** A job on the small plan, started by Sue (the acting supervisor), everyone briefed for shift 1. */
export function liveJob() {
  const log = eventLog();
  log.next('job.created', { job: { name: 'North bay erection', site: 'Yard 4', kind: 'erection', state: 'planning' }, craneFleetNumber: 'CR-07', crew: [crew[0]] });
  log.next('crew.set', { crew });
  log.next('configuration.set', { windLimits: testWindLimits, weatherFreshMinutes: 10 });
  log.next('job.ready', { state: 'ready', planVersion: 1, plan: smallPlan() });
  log.next('job.started', {});
  for (const who of [people.sue, people.otto, people.rita, people.sam, people.ned]) log.next('briefing.acknowledged', { planVersion: 1, shift: 1 }, { by: who });
  let state = replay(log.events)!;
  const apply = <T extends JobEventType>(type: T, data: TestData<T>, opts?: { by?: Who; at?: string }) => {
    state = applyEvent(state, log.next(type, data, opts));
    return state;
  };
  /** Sue ends shift 1: the checklist the board draws for the work as it stands. */
  const endShift = () => {
    const { workPhase, items } = makeSafeChecklist(state);
    return apply('shift.ending', { shift: 1, workPhase, items });
  };
  /** Each item ticked by the first crew member holding one of its roles. */
  const tickAll = () => {
    const items = state.shift!.makeSafe!.items;
    items.forEach((item, i) => {
      const role = item.roles[0];
      const who = Object.values(people).find((p) => p.role === role)!;
      apply('shift.item.done', { itemId: item.id, role, note: item.asksNote ? 'Key in the site office safe' : null, madeSafe: i === items.length - 1 }, { by: who });
    });
    return state;
  };
  return { log, apply, endShift, tickAll, get state() { return state; } };
}

/** A fresh Pinia with the board store holding `board`, live, and `who` signed in. */
export function storesWith(board: BoardState, who: { userId: string; name: string } | null, opts: { live?: boolean; canInspect?: boolean } = {}) {
  const pinia = createPinia();
  setActivePinia(pinia);
  const session = useSessionStore();
  if (who) {
    const user: UserDto = { id: who.userId, email: `${who.userId}@holdline.test`, displayName: who.name, qualifications: [], isAdmin: false, active: true, canInspect: opts.canInspect ?? false, hasPassword: true, createdAt: '2026-03-01T08:00:00.000Z', units: 'metric' };
    session.user = user;
  }
  const store = useBoardStore();
  const snapshot: BoardSnapshot = { ...board, presence: [] };
  store.board = snapshot;
  store.live = opts.live ?? true;
  return { pinia, store, session };
}

/** Quasar's package resolves to its server build under happy-dom: its controls are stood in for by plain elements with the same props. */
export const quasarStubs = {
  'q-icon': true,
  'q-btn': {
    props: ['label', 'disable', 'loading', 'type', 'icon'],
    emits: ['click'],
    template: `<button :type="type || 'button'" :disabled="disable || loading" @click="$emit('click', $event)">{{ label }}</button>`,
  },
  'q-input': {
    props: ['modelValue', 'label', 'disable'],
    emits: ['update:modelValue'],
    template: `<input :value="modelValue" :aria-label="label" :disabled="disable" @input="$emit('update:modelValue', $event.target.value)" />`,
  },
  'q-select': { props: ['modelValue', 'options', 'label'], template: '<select :aria-label="label"></select>' },
  'q-dialog': { props: ['modelValue'], template: '<div v-if="modelValue" class="q-dialog-stub"><slot /></div>' },
  'q-card': { template: '<div><slot /></div>' },
  'q-card-section': { template: '<div><slot /></div>' },
};
