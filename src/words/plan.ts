import type { CrewRole } from '../../shared/schemas/jobs';
import type { StepRecord } from '../../shared/schemas/plan';
import { roleLabel } from '../../shared/schemas/users';

/** Roles a step or hold can name; viewers only read the board, so they never complete or acknowledge. */
export const actingRoles: readonly CrewRole[] = ['supervisor', 'operator', 'signaller', 'rigger'];

/** The choices for what a step records, in words. */
export type RecordChoice = 'none' | StepRecord['kind'];
export const recordChoiceLabels: Record<RecordChoice, string> = {
  none: 'Nothing',
  serial: 'A serial number',
  reading: 'A reading',
};

/** Roles as a short list of words: "Operator, signaller and rigger". */
export function rolesInWords(roles: readonly string[]): string {
  const words = roles.map((r, i) => (i === 0 ? roleLabel(r) : roleLabel(r).toLowerCase()));
  if (words.length <= 1) return words[0] ?? 'Nobody';
  return `${words.slice(0, -1).join(', ')} and ${words[words.length - 1]}`;
}
