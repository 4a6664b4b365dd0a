import type { Qualification } from '../../shared/schemas/users.js';
import type { Upload } from '../entities/Upload.js';
import type { User } from '../entities/User.js';
import { forbidden, HttpError, unauthorized } from '../errors.js';

/**
 * Who a rule admits:
 * - `anyone`: no sign-in needed
 * - `signed_in`: any active, signed-in person
 * - `admin`: a person with the admin flag
 * - `self`: the person the request is about
 * - `qualification:X`: a person qualified for crew role X
 * - `crew:X`: a person holding crew role X on the job acted on; `crew:any`: in its crew at all
 */
export type Subject = 'anyone' | 'signed_in' | 'admin' | 'self' | `qualification:${Qualification}` | `crew:${Qualification}` | 'crew:any';

export interface PolicyRow {
  action: string;
  allow: readonly Subject[];
  /** The routes guarded by this action; the policy test calls each one as every kind of person. */
  routes: readonly string[];
}

/** The one table of who may do what. Every route and socket handler asks it through `can`. */
export const policyTable = [
  { action: 'health.read', allow: ['anyone'], routes: ['GET /api/health'] },
  { action: 'session.read', allow: ['signed_in'], routes: ['GET /api/auth/me'] },
  { action: 'users.list', allow: ['admin'], routes: ['GET /api/users'] },
  { action: 'users.invite', allow: ['admin'], routes: ['POST /api/users', 'POST /api/users/:userId/invitation'] },
  { action: 'users.read', allow: ['admin', 'self'], routes: ['GET /api/users/:userId'] },
  { action: 'users.update', allow: ['admin'], routes: ['PATCH /api/users/:userId'] },
  { action: 'audit.read', allow: ['admin'], routes: ['GET /api/audit/sign-ins'] },
  { action: 'inbox.read', allow: ['admin'], routes: ['GET /api/dev/inbox'] },
  { action: 'socket.connect', allow: ['signed_in'], routes: [] },
  {
    action: 'fleet.read',
    allow: ['signed_in'],
    routes: [
      'GET /api/crane-models',
      'GET /api/crane-models/:modelId',
      'GET /api/crane-models/:modelId/arrangement',
      'GET /api/crane-units',
      'GET /api/crane-units/:unitId',
      'GET /api/crane-units/:unitId/boom-makeup',
      'GET /api/assist-cranes',
      'GET /api/assist-cranes/:assistCraneId',
      'GET /api/components',
      'GET /api/components/:componentId',
      'GET /api/components/:componentId/inspections',
    ],
  },
  {
    action: 'fleet.change',
    allow: ['admin', 'qualification:supervisor'],
    routes: [
      'POST /api/crane-models',
      'PATCH /api/crane-models/:modelId',
      'POST /api/crane-models/import',
      'POST /api/crane-units',
      'PATCH /api/crane-units/:unitId',
      'POST /api/assist-cranes',
      'POST /api/components',
      'PATCH /api/components/:componentId',
    ],
  },
  {
    action: 'inspections.record',
    allow: ['admin', 'qualification:supervisor', 'qualification:rigger'],
    routes: ['POST /api/components/:componentId/inspections'],
  },
  {
    // Viewers watch and never act, so they never add photos.
    action: 'uploads.create',
    allow: ['admin', 'qualification:supervisor', 'qualification:operator', 'qualification:signaller', 'qualification:rigger'],
    routes: ['POST /api/uploads'],
  },
  { action: 'jobs.list', allow: ['signed_in'], routes: ['GET /api/jobs'] },
  // Supervisors pick their crews from the active people and their qualifications (no e-mails).
  { action: 'people.candidates', allow: ['admin', 'qualification:supervisor'], routes: ['GET /api/crew-candidates'] },
  { action: 'jobs.create', allow: ['admin', 'qualification:supervisor'], routes: ['POST /api/jobs'] },
  {
    action: 'jobs.read',
    allow: ['admin', 'qualification:supervisor', 'crew:any'],
    routes: [
      'GET /api/jobs/:jobId',
      'GET /api/jobs/:jobId/events',
      'GET /api/jobs/:jobId/readiness',
      'GET /api/jobs/:jobId/record/verify',
      'GET /api/jobs/:jobId/configuration.pdf',
      'GET /api/jobs/:jobId/plan',
      'GET /api/jobs/:jobId/plan/versions',
      'GET /api/jobs/:jobId/plan.pdf',
    ],
  },
  {
    // Only the job's own supervisors (or an admin) change a job.
    action: 'jobs.plan',
    allow: ['admin', 'crew:supervisor'],
    routes: [
      'PATCH /api/jobs/:jobId',
      'PUT /api/jobs/:jobId/crew',
      'PUT /api/jobs/:jobId/configuration',
      'PUT /api/jobs/:jobId/plan',
      'POST /api/jobs/:jobId/plan/generate',
      'POST /api/jobs/:jobId/ready',
    ],
  },
  {
    // The crew watch the board (viewers too); admins may watch any board.
    action: 'board.watch',
    allow: ['admin', 'crew:any'],
    routes: ['GET /api/jobs/:jobId/board'],
  },
  {
    // Acting on the board: the command layer then checks the role each command needs. Viewers
    // may raise a stop and record its cause (an operator obeys a stop from anyone), nothing else.
    action: 'board.command',
    allow: ['crew:supervisor', 'crew:operator', 'crew:signaller', 'crew:rigger', 'crew:viewer'],
    routes: ['POST /api/jobs/:jobId/commands'],
  },
  {
    // The job's supervisors ask for an override; another supervisor or an admin approves it.
    action: 'jobs.override',
    allow: ['admin', 'qualification:supervisor'],
    routes: ['POST /api/jobs/:jobId/overrides'],
  },
  {
    // The coarse rule; `canSeeUpload` then decides by what the photo belongs to.
    action: 'uploads.read',
    allow: ['signed_in'],
    routes: ['GET /api/uploads/:uploadId', 'GET /api/uploads/:uploadId/thumbnail'],
  },
] as const satisfies readonly PolicyRow[];

export type Action = (typeof policyTable)[number]['action'];

/** What an action is about, when a rule depends on it. */
export interface PolicyTarget {
  userId?: string;
  /** The roles the actor holds on the job acted on. */
  crewRoles?: readonly Qualification[];
}

const rows = new Map<string, readonly Subject[]>(policyTable.map((r) => [r.action, r.allow]));

function admits(subject: Subject, actor: User | null, target: PolicyTarget): boolean {
  if (subject === 'anyone') return true;
  if (!actor || !actor.active) return false;
  if (subject === 'signed_in') return true;
  if (subject === 'admin') return actor.isAdmin;
  if (subject === 'self') return target.userId === actor.id;
  if (subject === 'crew:any') return (target.crewRoles ?? []).length > 0;
  const [kind, role] = subject.split(':') as ['qualification' | 'crew', Qualification];
  if (kind === 'crew') return (target.crewRoles ?? []).includes(role);
  return actor.qualifications.includes(role);
}

/** May this person (or nobody signed in) do this action to this thing? */
export function can(actor: User | null, action: Action, target: PolicyTarget = {}): boolean {
  const allow = rows.get(action);
  if (!allow) return false;
  return allow.some((subject) => admits(subject, actor, target));
}

/** May this person see this photo? Decided by what it belongs to, after `uploads.read` admitted them. */
export function canSeeUpload(actor: User | null, upload: Pick<Upload, 'uploadedBy' | 'ownerKind'>, jobCrewRoles: readonly Qualification[] = []): boolean {
  if (!actor || !actor.active) return false;
  if (actor.isAdmin || upload.uploadedBy === actor.id) return true;
  switch (upload.ownerKind) {
    case null:
      // Not attached yet: it is still the uploader's draft.
      return false;
    case 'inspection':
      // Inspection records are part of the fleet history everyone signed in may read.
      return can(actor, 'fleet.read');
    case 'step':
    case 'hold':
    case 'defect':
      // Board photos belong to a job (their owner id is the job's): its crew and watchers see them.
      return can(actor, 'board.watch', { crewRoles: jobCrewRoles });
  }
}

/** Throws 401 when nobody is signed in and sign-in would help, 403 when the person may not. */
export function authorize(actor: User | null, action: Action, target: PolicyTarget = {}, signInProblem?: HttpError): void {
  if (can(actor, action, target)) return;
  if (!actor) throw signInProblem ?? unauthorized();
  throw forbidden();
}
