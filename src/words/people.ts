import type { SignInAuditKind } from '../../shared/schemas/audit';
import type { PersonStatus } from '../stores/people';

/** What each audit entry means, in words a site office reads without a manual. */
export const auditKindWords: Record<SignInAuditKind, string> = {
  sign_in: 'Signed in',
  sign_in_failed: 'Sign-in refused: wrong e-mail or password',
  sign_in_inactive: 'Sign-in refused: account deactivated',
  sign_out: 'Signed out',
  refresh_refused: 'Session renewal refused',
  refresh_reuse: 'Old session token used again; sessions ended',
  password_set: 'Password set',
  deactivated: 'Account deactivated',
  reactivated: 'Account reactivated',
  user_changed: 'Account changed by an administrator',
  user_invited: 'Invited by an administrator',
  crew_changed: 'Crew changed by an administrator',
};

/** Which audit entries deserve a second look; shown with a warning shape as well as colour. */
export const auditKindTone: Record<SignInAuditKind, 'normal' | 'warning'> = {
  sign_in: 'normal',
  sign_in_failed: 'warning',
  sign_in_inactive: 'warning',
  sign_out: 'normal',
  refresh_refused: 'warning',
  refresh_reuse: 'warning',
  password_set: 'normal',
  deactivated: 'warning',
  reactivated: 'normal',
  user_changed: 'normal',
  user_invited: 'normal',
  crew_changed: 'normal',
};

/** The inspection flag on the people screen: Holdline records the admin's word, it does not judge anyone's qualification. */
export const INSPECT_WORDS = {
  toggle: 'Qualified to inspect cranes',
  help: 'May acknowledge a job’s final sign-off (post-assembly inspection; crane made safe and off hire) as its inspector.',
  caution:
    'You confirm this qualification yourself. Licensed practice and the local codes decide who may inspect an assembled crane; Holdline only records what you set here.',
  chip: 'Inspector',
} as const;

/** Why an administrator's own account is read-only to them (the server answers `second_admin_needed`). */
export const SELF_CHANGE_WORDS = 'Another administrator changes your own name, qualifications and rights, so that nobody gives themselves rights alone.';

/** A status in words and the icon that goes with its colour. */
export const statusWords: Record<PersonStatus, { label: string; icon: string }> = {
  active: { label: 'Active', icon: 'check_circle' },
  pending: { label: 'Invitation pending', icon: 'schedule_send' },
  deactivated: { label: 'Deactivated', icon: 'block' },
};
