import { computed } from 'vue';
import { boardStatus, currentStages } from '../../shared/board/status';
import { useBoardStore } from '../stores/board';
import { useSessionStore } from '../stores/session';

/** What every board view reads: the board, who is looking, the board's status and the stages in progress. */
export function useBoardView() {
  const store = useBoardStore();
  const session = useSessionStore();
  const b = computed(() => store.board);
  const userId = computed(() => session.user?.id ?? '');
  const status = computed(() => (b.value ? boardStatus(b.value) : 'not-started'));
  const current = computed(() => (b.value ? currentStages(b.value) : []));
  return { store, session, b, userId, status, current };
}
