import { randomUUID } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import type { BoardCommandType } from '../../../shared/schemas/commands.js';
import type { CrewRole } from '../../../shared/schemas/jobs.js';
import { User } from '../../../server/entities/User.js';
import { HttpError } from '../../../server/errors.js';
import { authorizeBoardCommand } from '../../../server/policies/index.js';

/**
 * The one check both transports reach through runBoardCommand, without a server: what each kind
 * of person is answered, and which role a command is recorded under. The end-to-end answers over
 * HTTP and the socket are in tests/server/routes/board-api.test.ts and board-rules.test.ts.
 */
function person(overrides: Partial<Pick<User, 'isAdmin' | 'active'>> = {}): User {
  return Object.assign(new User(), { id: randomUUID(), displayName: 'Test person', qualifications: [], isAdmin: false, active: true, ...overrides });
}

function refusal(actor: User | null, type: BoardCommandType, roles: CrewRole[]): { status: number; code: string; message: string } | null {
  try {
    authorizeBoardCommand(actor, type, roles);
    return null;
  } catch (error) {
    if (!(error instanceof HttpError)) throw error;
    return { status: error.status, code: error.code, message: error.message };
  }
}

describe('authorizeBoardCommand', () => {
  it('asks for a sign-in when nobody is signed in', () => {
    expect(refusal(null, 'job.stop', ['rigger'])).toMatchObject({ status: 401, code: 'unauthenticated' });
  });

  it('refuses anyone outside the crew with forbidden, admins included, in words that say why', () => {
    expect(refusal(person(), 'job.stop', [])).toEqual({ status: 403, code: 'forbidden', message: 'You are not in this job’s crew. Ask its supervisor to add you.' });
    expect(refusal(person({ isAdmin: true }), 'job.start', [])).toMatchObject({ status: 403, code: 'forbidden' });
  });

  it('refuses a deactivated crew member', () => {
    expect(refusal(person({ active: false }), 'job.stop', ['supervisor'])).toMatchObject({ status: 403, code: 'forbidden' });
  });

  it('lets a viewer raise a stop and record its cause, as a viewer, and nothing else', () => {
    expect(authorizeBoardCommand(person(), 'job.stop', ['viewer'])).toEqual(['viewer']);
    expect(authorizeBoardCommand(person(), 'job.stop.note', ['viewer'])).toEqual(['viewer']);
    for (const type of ['step.complete', 'weather.record', 'briefing.acknowledge', 'defect.report', 'job.resume'] as const) {
      expect(refusal(person(), type, ['viewer']), type).toEqual({
        status: 403,
        code: 'role_not_allowed',
        message: 'Viewers watch the board and may raise a stop; they cannot act on it otherwise.',
      });
    }
  });

  it('records a stop under the acting role of someone who is also a viewer', () => {
    expect(authorizeBoardCommand(person(), 'job.stop', ['viewer', 'rigger'])).toEqual(['rigger']);
  });

  it('keeps the supervisor’s commands to supervisors and records them under that role only', () => {
    for (const type of ['job.start', 'job.complete', 'job.cancel', 'hold.release', 'hold.check.review', 'stage.skip', 'job.resume', 'plan.revise'] as const) {
      expect(refusal(person(), type, ['rigger', 'operator', 'signaller']), type).toEqual({ status: 403, code: 'role_not_allowed', message: 'Only the job’s supervisor can do that.' });
      expect(authorizeBoardCommand(person(), type, ['rigger', 'supervisor']), type).toEqual(['supervisor']);
    }
  });

  it('hands every acting role to the handlers for their finer checks', () => {
    expect(authorizeBoardCommand(person(), 'step.complete', ['operator', 'rigger', 'viewer'])).toEqual(['operator', 'rigger']);
    expect(authorizeBoardCommand(person(), 'hold.acknowledge', ['signaller'])).toEqual(['signaller']);
  });
});
