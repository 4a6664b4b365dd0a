import { describe, expect, it } from 'vitest';
import { holdFullyAcknowledged } from '../../../shared/board/apply';
import { pendingAcknowledgments } from '../../../shared/board/status';
import type { BoardHold } from '../../../shared/board/types';
import { board, hold, stage, step } from './states';

/** The job's final sign-off: the inspector acknowledges in their own crew role, in a slot of its own. */
describe('a sign-off hold', () => {
  const inspectorAsSupervisor = { role: 'supervisor' as const, userId: 'u-insp', name: 'Marta Lindqvist', at: '2026-12-03T10:00:00.000Z', inspector: true };
  const signOff = (acknowledgments: BoardHold['acknowledgments']) =>
    board([
      stage('handover', 16, {
        state: 'holding',
        steps: [step('handover.1', { state: 'done' })],
        hold: hold('handover.hold', { state: 'open', signOff: true, requiredRoles: ['supervisor', 'operator'], acknowledgments }),
      }),
    ]);

  it('still asks the supervisor after a supervisor acknowledged as the inspector', () => {
    const b = signOff([inspectorAsSupervisor]);
    expect(pendingAcknowledgments(b, 'u-sup', ['supervisor']).map((p) => p.role)).toEqual(['supervisor']);
    // The inspector has answered this hold once and is not asked again.
    expect(pendingAcknowledgments(b, 'u-insp', ['supervisor'])).toEqual([]);
  });

  it('is fully acknowledged only with every role and the inspector, each slot by its own acknowledgment', () => {
    const sup = { role: 'supervisor' as const, userId: 'u-sup', name: 'Rhys Calloway', at: '2026-12-03T10:01:00.000Z' };
    const op = { role: 'operator' as const, userId: 'u-op', name: 'Tomasz Wierzba', at: '2026-12-03T10:02:00.000Z' };
    const holdOf = (b: ReturnType<typeof signOff>) => b.stages[0].hold!;
    expect(holdFullyAcknowledged(holdOf(signOff([sup, op])))).toBe(false);
    // The inspector's acknowledgment in the supervisor role does not stand for the supervisor.
    expect(holdFullyAcknowledged(holdOf(signOff([inspectorAsSupervisor, op])))).toBe(false);
    expect(holdFullyAcknowledged(holdOf(signOff([inspectorAsSupervisor, sup, op])))).toBe(true);
  });
});
