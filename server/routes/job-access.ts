import type { Request } from 'express';
import { z } from 'zod';
import type { CrewRole } from '../../shared/schemas/jobs.js';
import type { AppContext } from '../context.js';
import { Job } from '../entities/Job.js';
import type { User } from '../entities/User.js';
import { badRequest, unauthorized } from '../errors.js';
import { authorize, type Action } from '../policies/index.js';
import { crewRolesOf } from '../queries/crew.js';
import { findByIdOr404 } from './find.js';

/**
 * Loads the job named in the path and checks the action against the policy with the person's
 * crew roles on it: 401 without sign-in, 404 for no such job, 403 when not allowed.
 */
export async function loadJobFor(context: AppContext, req: Request, action: Action): Promise<{ job: Job; actor: User; crewRoles: CrewRole[] }> {
  const actor = req.actor ?? null;
  if (!actor) throw req.authProblem ?? unauthorized();
  // Read through the queue: a change still being written (which may yet fail) is never what a request sees or is allowed by.
  const { job, crewRoles } = await context.queue.run(async () => {
    const found = await findByIdOr404(context.dataSource.manager, Job, String(req.params.jobId), 'That job');
    return { job: found, crewRoles: await crewRolesOf(context.dataSource.manager, found.id, actor.id) };
  });
  authorize(actor, action, { crewRoles });
  return { job, actor, crewRoles };
}

/** An optional `X-Command-Id` (UUID) makes a retried HTTP change apply once. */
export function commandIdOf(req: Request): string | undefined {
  const header = req.get('x-command-id');
  if (header === undefined) return undefined;
  if (!z.uuid().safeParse(header).success) throw badRequest('X-Command-Id must be a UUID.', [{ path: 'X-Command-Id', message: 'Not a UUID' }]);
  return header;
}
