/**
 * Words of the installed app when the network is gone: the board this device saved, shown not
 * live (stores/board.ts, SavedBoardBanner.vue), and the screen wake lock of the board views.
 */

/** The band over a board read from this device instead of the server. */
export const SAVED_BOARD_WORDS = {
  title: 'NOT LIVE',
  /** Why no control sends anything from it (beside each control, as every blocked control says). */
  blocked: 'Not live: this is the board saved on this device. Nothing is sent from it; use radio and signal.',
  stale: 'Saved on this device. Anything may have changed since: do not rely on it. Use radio and signal.',
  notSignedIn: (name: string) => `Not signed in live: no connection to the Holdline server. Saved for ${name}.`,
  reconnecting: 'Trying to reconnect by itself… The live board replaces this one as soon as it is back.',
} as const;

/**
 * How long ago, never less than it was (safe side: an old board must not read as fresher): whole
 * minutes rounded up, "less than a minute" only under 60 s.
 */
export function ageWords(sinceMs: number, nowMs: number): string {
  const seconds = Math.max(0, (nowMs - sinceMs) / 1000);
  if (seconds < 60) return 'less than a minute ago';
  const minutes = Math.ceil(seconds / 60);
  if (minutes < 60) return `${minutes} min ago`;
  const hours = Math.floor(minutes / 60);
  if (hours < 48) return minutes % 60 === 0 ? `${hours} h ago` : `${hours} h ${minutes % 60} min ago`;
  return `more than ${Math.floor(hours / 24)} days ago`;
}

/** After the band's NOT LIVE: "shows the board as of 14:02 (UTC+01:00), 12 min ago"; `when` is the site's clock (services/time.ts). */
export function savedBoardAge(when: string, age: string): string {
  return `shows the board as of ${when}, ${age}`;
}

/** The board views' one line about the screen wake lock (useWakeLock). */
export const WAKE_LOCK_WORDS = {
  kept: 'Screen kept awake.',
  failed: 'Screen may sleep: keep it awake in the phone’s settings.',
} as const;
