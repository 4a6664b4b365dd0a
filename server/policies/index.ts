import type { BoardCommandType } from '../../shared/schemas/commands.js';
import type { CrewRole } from '../../shared/schemas/jobs.js';
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
  /** The Socket.IO events guarded by this action (`connect` is the handshake). */
  events?: readonly string[];
  /**
   * Set when the route admits anyone and then checks what the request itself carries (a password,
   * the refresh cookie, an e-mailed link): its own refusals are about that proof, not this table.
   */
  proof?: string;
  /** The words of the 403 when a signed-in person is refused, when the generic ones would not help. */
  refusal?: string;
}

/**
 * The one table of who may do what. Every route and socket event has a row (a test walks the real
 * app and the socket handlers to check); the guarded ones ask it through `can` or `authorize`.
 */
export const policyTable = [
  { action: 'health.read', allow: ['anyone'], routes: ['GET /api/health'] },
  {
    action: 'session.start',
    allow: ['anyone'],
    routes: ['POST /api/auth/login', 'POST /api/auth/refresh', 'POST /api/auth/set-password', 'GET /api/auth/links/:token'],
    proof: 'a password, the refresh cookie or an e-mailed sign-in link',
  },
  // Signing out ends the session of the refresh cookie or access token sent, if any; it answers the same either way.
  { action: 'session.end', allow: ['anyone'], routes: ['POST /api/auth/logout'] },
  // Anyone may ask; the answer never says whether the address has an account.
  { action: 'password.reset', allow: ['anyone'], routes: ['POST /api/auth/password-reset'] },
  { action: 'session.read', allow: ['signed_in'], routes: ['GET /api/auth/me'] },
  { action: 'users.list', allow: ['admin'], routes: ['GET /api/users'] },
  { action: 'users.invite', allow: ['admin'], routes: ['POST /api/users', 'POST /api/users/:userId/invitation'] },
  { action: 'users.read', allow: ['admin', 'self'], routes: ['GET /api/users/:userId'] },
  { action: 'users.update', allow: ['admin'], routes: ['PATCH /api/users/:userId'] },
  // How Holdline shows things to a person (their units) is theirs alone to choose, admins included.
  { action: 'users.preferences', allow: ['self'], routes: ['PATCH /api/users/:userId/preferences'] },
  { action: 'audit.read', allow: ['admin'], routes: ['GET /api/audit/sign-ins'] },
  { action: 'inbox.read', allow: ['admin'], routes: ['GET /api/dev/inbox'] },
  // E-mails for the record that failed or wait for another try: addresses of crews and clients, so admins only.
  { action: 'mail.problems.read', allow: ['admin'], routes: ['GET /api/mail/problems'] },
  {
    // What any connected socket may do for itself: connect, renew its own session with a fresh
    // token (checked again against this row), and leave a board it joined.
    action: 'socket.connect',
    allow: ['signed_in'],
    routes: [],
    events: ['connect', 'session:renew', 'board:leave'],
  },
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
  // Each person's list holds only the jobs they may read by the `jobs.read` row (`seesAllJobs`).
  { action: 'jobs.list', allow: ['signed_in'], routes: ['GET /api/jobs'] },
  // The same jobs as GET /api/jobs, filtered by `seesAllJobs` in the same way.
  { action: 'records.list', allow: ['signed_in'], routes: ['GET /api/records'] },
  // Supervisors pick their crews from the active people and their qualifications (no e-mails).
  { action: 'people.candidates', allow: ['admin', 'qualification:supervisor'], routes: ['GET /api/crew-candidates'] },
  // A supervisor who creates a job joins its crew as its supervisor (createJob), and so reads it.
  { action: 'jobs.create', allow: ['admin', 'qualification:supervisor'], routes: ['POST /api/jobs'] },
  {
    // A job's data is its crew's (any role, viewers too) and the administrators', nobody else's: a
    // supervisor of another job reads nothing of this one, whatever id they ask for.
    action: 'jobs.read',
    allow: ['admin', 'crew:any'],
    routes: [
      'GET /api/jobs/:jobId',
      'GET /api/jobs/:jobId/events',
      'GET /api/jobs/:jobId/readiness',
      'GET /api/jobs/:jobId/record/verify',
      // The log leaves the server here; blind-check values are redacted for all but the job's planners.
      'GET /api/jobs/:jobId/events.jsonl',
      'GET /api/jobs/:jobId/events.csv',
      'GET /api/jobs/:jobId/site-file.zip',
      'GET /api/jobs/:jobId/record.pdf',
      'GET /api/jobs/:jobId/configuration.pdf',
      'GET /api/jobs/:jobId/plan',
      'GET /api/jobs/:jobId/plan/versions',
      'GET /api/jobs/:jobId/plan.pdf',
      // The plan from the board's state onward, for working on paper; redacted like plan.pdf.
      'GET /api/jobs/:jobId/paper.pdf',
    ],
    // A list follows the jobs it shows, each one checked against this row.
    events: ['jobs:follow'],
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
    events: ['board:join'],
    refusal: 'Only the job’s crew can open its board.',
  },
  {
    // Acting on the board at all; `boardCommandRoles` below then says which crew roles send each
    // command, and the handlers check the finer rules (a step's roles, a hold's roles).
    action: 'board.command',
    allow: ['crew:supervisor', 'crew:operator', 'crew:signaller', 'crew:rigger', 'crew:viewer'],
    routes: ['POST /api/jobs/:jobId/commands'],
    events: ['board:command'],
    refusal: 'You are not in this job’s crew. Ask its supervisor to add you.',
  },
  {
    // When the outgoing supervisor cannot be reached to hand over, an admin names the acting supervisor, with a reason.
    action: 'jobs.acting.transfer',
    allow: ['admin'],
    routes: ['POST /api/jobs/:jobId/acting-supervisor'],
    refusal: 'Only an administrator can make someone the acting supervisor. The usual way is the handover: the acting supervisor writes the note and the supervisor taking over acknowledges it.',
  },
  {
    // The job's supervisors ask for an override; another of its supervisors or an admin approves
    // it. A supervisor on no crew of the job has not planned it and approves nothing on it.
    action: 'jobs.override',
    allow: ['admin', 'crew:supervisor'],
    routes: ['POST /api/jobs/:jobId/overrides'],
    refusal: 'Only a supervisor in this job’s crew or an administrator can ask for or approve its overrides. Ask the job’s supervisor to add you to the crew.',
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

const rows = new Map<string, PolicyRow>(policyTable.map((r) => [r.action, r]));

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
  const row = rows.get(action);
  if (!row) return false;
  return row.allow.some((subject) => admits(subject, actor, target));
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
      // Board photos belong to a job (their owner id is the job's): whoever reads the job sees them
      // (`jobs.read`: its crew in any role, and administrators), nobody else by changing an id.
      return can(actor, 'jobs.read', { crewRoles: jobCrewRoles });
  }
}

/** What a person's open sockets may go on receiving from one job (re-checked when their crew roles or admin flag change). */
export interface LiveJobAccess {
  /** The board's events and presence (`board.watch`). */
  watch: boolean;
  /** The planners' unredacted copy of the events (`jobs.plan`). */
  planner: boolean;
  /** The job's list line (`jobs.read`). */
  read: boolean;
}

/** The live access the policy gives this person to a job on which they hold these crew roles. */
export function liveJobAccess(actor: User | null, crewRoles: readonly Qualification[]): LiveJobAccess {
  return {
    watch: can(actor, 'board.watch', { crewRoles }),
    planner: can(actor, 'jobs.plan', { crewRoles }),
    read: can(actor, 'jobs.read', { crewRoles }),
  };
}

/** Throws 401 when nobody is signed in and sign-in would help, 403 when the person may not. */
export function authorize(actor: User | null, action: Action, target: PolicyTarget = {}, signInProblem?: HttpError): void {
  if (can(actor, action, target)) return;
  if (!actor) throw signInProblem ?? unauthorized();
  throw forbidden(rows.get(action)?.refusal);
}

const acting: readonly CrewRole[] = ['supervisor', 'operator', 'signaller', 'rigger'];
const supervisor: readonly CrewRole[] = ['supervisor'];
/** Everyone in the crew: an operator obeys a stop signal from anyone (ASME B30.5, from memory), and whoever stops records why. */
const wholeCrew: readonly CrewRole[] = [...acting, 'viewer'];

/** Which crew roles may send each board command, after `board.command` admitted the person. */
export const boardCommandRoles: { readonly [T in BoardCommandType]: readonly CrewRole[] } = {
  'job.start': supervisor,
  'job.complete': supervisor,
  'job.cancel': supervisor,
  'briefing.acknowledge': acting,
  'step.complete': acting,
  'step.reopen': acting,
  'hold.acknowledge': acting,
  'hold.withdraw': acting,
  'hold.release': supervisor,
  'hold.check.review': supervisor,
  'stage.skip': supervisor,
  'job.stop': wholeCrew,
  'job.stop.note': wholeCrew,
  'job.resume': supervisor,
  'weather.record': acting,
  'defect.report': acting,
  'plan.revise': supervisor,
  'shift.end': supervisor,
  // Each item names its own roles; the handler checks them.
  'shift.item.done': acting,
  'handover.write': supervisor,
  'handover.acknowledge': supervisor,
  // Whoever the administrator marks qualified to inspect, in their crew role; the handler checks the mark.
  'shift.inspect': acting,
  'shift.acknowledge': ['operator', 'supervisor'],
  'shift.start': supervisor,
};

/**
 * The one check of who may send a board command, asked by every transport through
 * `runBoardCommand`: 401 without a person, 403 `forbidden` outside the crew, 403
 * `role_not_allowed` when none of the person's crew roles sends this command. Returns the roles
 * the command may be recorded under; a viewer's role counts only when the person holds no other.
 */
export function authorizeBoardCommand(actor: User | null, type: BoardCommandType, crewRoles: readonly CrewRole[]): CrewRole[] {
  authorize(actor, 'board.command', { crewRoles });
  const allowed = boardCommandRoles[type];
  const admitted = crewRoles.filter((r) => allowed.includes(r));
  const actingRoles = admitted.filter((r) => r !== 'viewer');
  if (actingRoles.length) return actingRoles;
  if (admitted.length) return admitted;
  if (crewRoles.every((r) => r === 'viewer')) {
    throw new HttpError(403, 'role_not_allowed', 'Viewers watch the board and may raise a stop; they cannot act on it otherwise.');
  }
  if (allowed.length === 1 && allowed[0] === 'supervisor') throw new HttpError(403, 'role_not_allowed', 'Only the job’s supervisor can do that.');
  throw new HttpError(403, 'role_not_allowed', `This is for: ${allowed.join(', ')}.`);
}
