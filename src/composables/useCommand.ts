import { computed, ref } from 'vue';
import type { CommandAnswer } from '../../shared/events/socket';
import { useBoardStore, type CommandInput } from '../stores/board';

/** A refusal in plain words: the server's message, then what each named field needs. */
export function refusalWords(answer: Extract<CommandAnswer, { ok: false }>): string {
  const fields = (answer.error.fields ?? []).map((f) => f.message).filter((m) => m && !answer.error.message.includes(m));
  return fields.length ? `${answer.error.message} ${fields.join('. ')}.` : answer.error.message;
}

/**
 * One button's command: it shows waiting while the server has not answered (nothing on the board
 * changes before the server's event), and keeps the refusal in plain words to show beside it.
 */
export function useCommand() {
  const board = useBoardStore();
  const commandId = ref<string | null>(null);
  const problem = ref('');
  const fields = ref<Record<string, string>>({});
  const waiting = computed(() => commandId.value !== null && board.isWaiting(commandId.value));

  async function run(command: CommandInput): Promise<boolean> {
    const id = crypto.randomUUID();
    commandId.value = id;
    problem.value = '';
    fields.value = {};
    const answer = await board.send(command, id);
    if (answer.ok) return true;
    problem.value = refusalWords(answer);
    fields.value = Object.fromEntries((answer.error.fields ?? []).map((f) => [f.path, f.message]));
    return false;
  }

  function clear() {
    problem.value = '';
    fields.value = {};
  }
  return { run, waiting, problem, fields, clear };
}
