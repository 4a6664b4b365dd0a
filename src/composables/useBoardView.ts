import { computed } from 'vue';
import { boardStatus, currentStages } from '../../shared/board/status';
import { useBoardStore } from '../stores/board';

/** What every board view reads: the board, its status and the stages in progress (who is looking comes from the stores where it is needed). */
export function useBoardView() {
  const store = useBoardStore();
  const b = computed(() => store.board);
  const status = computed(() => (b.value ? boardStatus(b.value) : 'not-started'));
  const current = computed(() => (b.value ? currentStages(b.value) : []));
  return { store, b, status, current };
}
