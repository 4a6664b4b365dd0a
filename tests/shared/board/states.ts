// Small boards for the tests of what the board says (shared/board/status.ts): invented stages,
// steps and holds in the shapes the reducer builds.
import type { BoardHold, BoardStage, BoardState, BoardStep } from '../../../shared/board/types.js';

export function step(id: string, overrides: Partial<BoardStep> = {}): BoardStep {
  return { id, text: `Step ${id}`, state: 'open', allowedRoles: ['rigger'], requiresPhoto: false, records: null, caution: null, doneBy: null, required: false, after: [], outOfLimit: null, ...overrides };
}

export function hold(id: string, overrides: Partial<BoardHold> = {}): BoardHold {
  return { id, state: 'waiting', title: `Hold ${id}`, instruction: 'Check it', mandatory: false, requiredRoles: ['operator', 'signaller'], valueCheck: null, acknowledgments: [], releasedBy: null, checkFailures: [], failuresSinceReview: 0, checkLocked: false, lastReview: null, ...overrides };
}

export function stage(id: string, order: number, overrides: Partial<BoardStage> = {}): BoardStage {
  return {
    id,
    order,
    title: `Stage ${id}`,
    summary: '',
    state: 'locked',
    dependsOn: [],
    cautions: [],
    involvesCraneMovement: false,
    steps: [],
    hold: null,
    skipReason: null,
    blockedBy: null,
    ...overrides,
  };
}

export function board(stages: BoardStage[], state: BoardState['job']['state'] = 'live'): BoardState {
  return {
    seq: 10,
    job: { id: 'job-1', name: 'Job', site: 'Site', kind: 'erection', state, craneFleetNumber: 'LC-07', stop: null, lastResume: null, cancelReason: null },
    planVersion: 1,
    stages,
    crew: [],
    briefed: [],
    weather: null,
    windLimits: null,
    defects: [],
  };
}
