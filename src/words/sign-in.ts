/** What the sign-in page says (src/pages/auth/SignInPage.vue). */

export const SIGN_IN_LABEL = 'Sign in';

/** Shown once when the server asks for a wait after too many failed sign-ins; the button counts down. */
export const SIGN_IN_WAIT_WORDS = 'Too many failed sign-ins for this account from here. Sign in opens again when the countdown on the button ends, or reset your password.';

/** A wait in a button's few words: "8 s", "2 min 05 s". */
export function waitShort(seconds: number): string {
  const s = Math.max(0, Math.ceil(seconds));
  if (s < 60) return `${s} s`;
  return `${Math.floor(s / 60)} min ${String(s % 60).padStart(2, '0')} s`;
}

/** The Sign in button's label while it waits. */
export function signInWaitLabel(seconds: number): string {
  return `Try again in ${waitShort(seconds)}`;
}
