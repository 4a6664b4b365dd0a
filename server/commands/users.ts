import { createHash, randomUUID } from 'node:crypto';
import { In, type EntityManager } from 'typeorm';
import { acknowledgmentsLeaving } from '../../shared/board/shifts.js';
import type { InviteUserRequest, Qualification, UpdatePreferencesRequest, UpdateUserRequest } from '../../shared/schemas/users.js';
import { DEFAULT_UNIT_SYSTEM, type UnitSystem } from '../../shared/units/quantity.js';
import { hashPassword } from '../auth/passwords.js';
import { revokeAllForUser } from '../auth/refresh-tokens.js';
import { createSignInLink } from '../auth/sign-in-links.js';
import type { AppContext } from '../context.js';
import { Job } from '../entities/Job.js';
import { JobCrew } from '../entities/JobCrew.js';
import { User } from '../entities/User.js';
import { conflict, notFound, secondAdminNeeded } from '../errors.js';
import { liveJobAccess, type LiveJobAccess } from '../policies/index.js';
import { crewRolesByJob } from '../queries/crew.js';
import { invitationMail, resetMail } from '../mail/templates.js';
import { recordSignInAudit } from './audit.js';
import { runJobCommand } from './job-writer.js';

export interface NewUser {
  email: string;
  displayName: string;
  qualifications: Qualification[];
  isAdmin?: boolean;
  canInspect?: boolean;
  password?: string;
  units?: UnitSystem;
}

/** Creates a person; e-mails are unique regardless of case. Runs inside the caller's transaction. */
export async function createUser(manager: EntityManager, input: NewUser): Promise<User> {
  const email = input.email.trim().toLowerCase();
  const existing = await manager.findOneBy(User, { email });
  if (existing) throw conflict('email_taken', `Someone already has the e-mail ${email}.`);
  const now = new Date().toISOString();
  const user = manager.create(User, {
    id: randomUUID(),
    email,
    displayName: input.displayName.trim(),
    passwordHash: input.password ? await hashPassword(input.password) : null,
    qualifications: [...new Set(input.qualifications)],
    isAdmin: input.isAdmin ?? false,
    active: true,
    canInspect: input.canInspect ?? false,
    units: input.units ?? DEFAULT_UNIT_SYSTEM,
    createdAt: now,
    updatedAt: now,
  });
  return manager.save(user);
}

function linkUrl(context: AppContext, token: string): string {
  return `${context.config.publicUrl}/set-password?token=${encodeURIComponent(token)}`;
}

/** Creates a person without a password and e-mails them an invitation link. */
export async function inviteUser(context: AppContext, input: InviteUserRequest & { qualifications: Qualification[]; isAdmin: boolean }, invitedBy: User): Promise<User> {
  const now = context.now();
  const { user, token } = await context.queue.transaction(async (manager) => {
    const created = await createUser(manager, input);
    const link = await createSignInLink(manager, created.id, 'invitation', now);
    const rights = [`qualifications ${created.qualifications.join(', ') || 'none'}`, ...(created.isAdmin ? ['administrator'] : []), ...(created.canInspect ? ['qualified to inspect'] : [])];
    await recordSignInAudit(manager, { kind: 'user_invited', email: created.email, userId: created.id, detail: `by ${invitedBy.email}: ${rights.join('; ')}` }, now);
    return { user: created, token: link.token };
  });
  await context.mailer.send(invitationMail(user.email, user.displayName, linkUrl(context, token), invitedBy.displayName));
  return user;
}

/** Sends a fresh invitation to someone who has not set a password; earlier links stop working. */
export async function resendInvitation(context: AppContext, userId: string, invitedBy: User): Promise<void> {
  const now = context.now();
  const { user, token } = await context.queue.transaction(async (manager) => {
    const found = await manager.findOneBy(User, { id: userId });
    if (!found) throw notFound('That person');
    if (found.passwordHash) throw conflict('already_joined', `${found.displayName} has already set a password; they can reset it from the sign-in page.`);
    if (!found.active) throw conflict('account_inactive', `${found.displayName} is deactivated; reactivate them first.`);
    const link = await createSignInLink(manager, found.id, 'invitation', now);
    return { user: found, token: link.token };
  });
  await context.mailer.send(invitationMail(user.email, user.displayName, linkUrl(context, token), invitedBy.displayName));
}

/** E-mails a reset link when the address belongs to an active person; silent otherwise. True when an e-mail went out. */
export async function requestPasswordReset(context: AppContext, email: string): Promise<boolean> {
  const now = context.now();
  const found = await context.queue.transaction(async (manager) => {
    const user = await manager.findOneBy(User, { email: email.trim().toLowerCase() });
    if (!user || !user.active) return null;
    const link = await createSignInLink(manager, user.id, 'reset', now);
    return { user, token: link.token };
  });
  if (!found) return false;
  await context.mailer.send(resetMail(found.user.email, found.user.displayName, linkUrl(context, found.token)));
  return true;
}

/** Each field a change really changes, in words for the audit ("qualifications rigger → rigger, operator"). */
function changeWords(found: User, changes: UpdateUserRequest): string[] {
  const yesNo = (v: boolean) => (v ? 'yes' : 'no');
  const list = (q: readonly string[]) => (q.length ? q.join(', ') : 'none');
  const out: string[] = [];
  if (changes.displayName !== undefined && changes.displayName !== found.displayName) out.push(`name “${found.displayName}” → “${changes.displayName}”`);
  if (changes.qualifications !== undefined) {
    const next = [...new Set(changes.qualifications)];
    if (next.length !== found.qualifications.length || next.some((q) => !found.qualifications.includes(q))) out.push(`qualifications ${list(found.qualifications)} → ${list(next)}`);
  }
  if (changes.isAdmin !== undefined && changes.isAdmin !== found.isAdmin) out.push(`administrator ${yesNo(found.isAdmin)} → ${yesNo(changes.isAdmin)}`);
  if (changes.canInspect !== undefined && changes.canInspect !== found.canInspect) out.push(`qualified to inspect ${yesNo(found.canInspect)} → ${yesNo(changes.canInspect)}`);
  return out;
}

/**
 * Changes a person's name, qualifications, admin flag or active flag. Deactivation revokes every
 * session and disconnects every socket at once. The last active admin cannot be removed. An
 * administrator's own account is changed by another administrator (403 `second_admin_needed`),
 * and every change is written to the audit.
 */
export async function updateUser(context: AppContext, userId: string, changes: UpdateUserRequest, actor: User, ip: string | null): Promise<User> {
  const now = context.now();
  const { user, deactivated, access } = await context.queue.transaction(async (manager) => {
    const found = await manager.findOneBy(User, { id: userId });
    if (!found) throw notFound('That person');
    if (changes.active === false && found.id === actor.id) throw conflict('self_deactivate', 'You cannot deactivate your own account. Ask another administrator.');
    const losesAdmin = found.isAdmin && found.active && (changes.isAdmin === false || changes.active === false);
    if (losesAdmin) {
      const admins = await manager.countBy(User, { isAdmin: true, active: true });
      if (admins <= 1) throw conflict('last_admin', 'This is the last active administrator. Make someone else an administrator first.');
    }
    const words = changeWords(found, changes);
    // Nobody grants themselves a qualification, the inspection mark or rights: a second administrator does.
    if (found.id === actor.id && (words.length || (changes.active !== undefined && changes.active !== found.active))) throw secondAdminNeeded('change your own account');
    const wasActive = found.active;
    if (changes.displayName !== undefined) found.displayName = changes.displayName;
    if (changes.qualifications !== undefined) found.qualifications = [...new Set(changes.qualifications)];
    if (changes.isAdmin !== undefined) found.isAdmin = changes.isAdmin;
    if (changes.active !== undefined) found.active = changes.active;
    if (changes.canInspect !== undefined) found.canInspect = changes.canInspect;
    found.updatedAt = now.toISOString();
    await manager.save(found);
    if (words.length) await recordSignInAudit(manager, { kind: 'user_changed', email: found.email, userId: found.id, ip, detail: `by ${actor.email}: ${words.join('; ')}` }, now);
    if (wasActive && !found.active) {
      await revokeAllForUser(manager, found.id, now);
      await recordSignInAudit(manager, { kind: 'deactivated', email: found.email, userId: found.id, ip, detail: `by ${actor.email}` }, now);
    } else if (!wasActive && found.active) {
      await recordSignInAudit(manager, { kind: 'reactivated', email: found.email, userId: found.id, ip, detail: `by ${actor.email}` }, now);
    }
    // An admin no longer: the boards they watch without being crew close on the sockets they have open.
    let access: { jobId: string; access: LiveJobAccess }[] = [];
    if (found.active && changes.isAdmin === false) {
      const jobIds = context.publisher.jobsReachedBy(found.id);
      const roles = await crewRolesByJob(manager, found.id, jobIds);
      access = jobIds.map((jobId) => ({ jobId, access: liveJobAccess(found, roles.get(jobId) ?? []) }));
    }
    return { user: found, deactivated: wasActive && !found.active, access };
  });
  for (const a of access) context.publisher.limitJobAccess(a.jobId, user.id, a.access, `${actor.displayName} made you no longer an administrator; you are not on this job’s crew, so its live board is closed for you.`);
  if (deactivated) {
    context.publisher.endSessions(user.id, 'Your account was deactivated by an administrator.');
    await withdrawDisabledAcknowledgments(context, user, actor, now);
  }
  return user;
}

/** The handler found nothing of theirs to take back: no event is written. */
class NothingToWithdraw extends Error {}

/**
 * After a deactivation has committed: on every job under way where the person is crew, their
 * acknowledgments of holds not yet released (and of the start-of-shift hold) are taken back by a
 * `crew.member.disabled` event, in the administrator's name, so the hold re-opens and every screen
 * says why. The deactivation is never refused or failed for it (an account may have to be shut at
 * once, even when its person is the only one in a role; the hold then waits for someone else):
 * a failure is logged. Each event's command id is made from the job, the person and the moment of
 * the deactivation, so running this again for the same deactivation writes nothing twice.
 */
export async function withdrawDisabledAcknowledgments(context: AppContext, user: User, actor: User, deactivatedAt: Date): Promise<void> {
  let jobIds: string[];
  try {
    jobIds = await context.queue.run(async () => {
      const rows = await context.dataSource.manager.find(JobCrew, { where: { userId: user.id }, select: { jobId: true } });
      const ids = [...new Set(rows.map((r) => r.jobId))];
      if (ids.length === 0) return [];
      const jobs = await context.dataSource.manager.find(Job, { where: { id: In(ids), state: In(['ready', 'live', 'stopped', 'made_safe']) }, select: { id: true } });
      return jobs.map((j) => j.id);
    });
  } catch (error) {
    context.logger.error({ err: error, userId: user.id }, 'could not list the jobs of a deactivated person; their hold acknowledgments were not withdrawn');
    return;
  }
  const at = deactivatedAt.toISOString();
  for (const jobId of jobIds) {
    try {
      const body = { type: 'crew.member.disabled', userId: user.id, deactivatedAt: at };
      await runJobCommand(context, jobId, { commandId: stableCommandId(`crew.member.disabled:${jobId}:${user.id}:${at}`), body, actor }, async (_manager, job) => {
        const board = job.board;
        if (!board || !['ready', 'live', 'stopped', 'made_safe'].includes(board.job.state)) throw new NothingToWithdraw();
        const withdrawn = acknowledgmentsLeaving(board, (userId) => userId !== user.id);
        if (withdrawn.length === 0) throw new NothingToWithdraw();
        return { type: 'crew.member.disabled', role: 'admin', data: { userId: user.id, name: user.displayName, withdrawn } };
      });
    } catch (error) {
      if (error instanceof NothingToWithdraw) continue;
      context.logger.error({ err: error, jobId, userId: user.id }, 'could not withdraw a deactivated person’s hold acknowledgments');
    }
  }
}

/** A UUID-shaped id that is always the same for the same words (command ids are UUIDs of 36 characters). */
function stableCommandId(words: string): string {
  const hex = createHash('sha256').update(words).digest('hex');
  // Version 8 (custom) and the RFC 4122 variant, so it reads as a well-formed UUID.
  return `${hex.slice(0, 8)}-${hex.slice(8, 12)}-8${hex.slice(13, 16)}-${((parseInt(hex[16]!, 16) & 0x3) | 0x8).toString(16)}${hex.slice(17, 20)}-${hex.slice(20, 32)}`;
}

/** A person's own settings (their units); nothing else of the account changes and nothing is audited. */
export async function updatePreferences(context: AppContext, userId: string, changes: UpdatePreferencesRequest): Promise<User> {
  const now = context.now();
  return context.queue.transaction(async (manager) => {
    const found = await manager.findOneBy(User, { id: userId });
    if (!found) throw notFound('That person');
    if (changes.units !== undefined) found.units = changes.units;
    found.updatedAt = now.toISOString();
    return manager.save(found);
  });
}
