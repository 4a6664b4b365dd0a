import { defineStore } from 'pinia';
import { computed, ref } from 'vue';
import { sessionSchema, type SessionDto } from '../../shared/schemas/auth';
import { userEnvelopeSchema, type UserDto } from '../../shared/schemas/users';
import { DEFAULT_UNIT_SYSTEM, quantitiesIn, type UnitSystem } from '../../shared/units/quantity';
import { api, ApiRequestError, setTokenSource } from '../services/api';
import { clearSavedBoards } from '../services/saved-boards';
import { disconnectSocket, renewSocketToken, setSocketSession } from '../services/socket';

/** What the router does when the server ends the session while a screen is open (src/router/index.ts: the sign-in page). */
let sessionEndedHandler: (() => void) | null = null;

/** The router registers here: it imports this store, so the store cannot import it. */
export function whenSessionEnded(handler: () => void): void {
  sessionEndedHandler = handler;
}

/** Refresh this long before the access token expires, so a shift never sees it lapse. */
const REFRESH_MARGIN_MS = 60_000;

/** Who is signed in, with the short-lived access token kept in memory only. */
export const useSessionStore = defineStore('session', () => {
  const user = ref<UserDto | null>(null);
  const token = ref<string | null>(null);
  const expiresAtMs = ref(0);
  const restored = ref(false);
  /**
   * The last refresh got no answer from the server (no network, or the server down or restarting),
   * as opposed to a refusal: a board saved on this device may be shown, not live (router/index.ts).
   */
  const serverUnreachable = ref(false);
  /** Why the server ended this session while it was open (signed out on this device, deactivated); '' otherwise. */
  const endedReason = ref('');
  /**
   * The server's IANA time zone, from every session answer: a new job's default site zone, and the
   * zone of times that belong to no job (fleet, people). Until a session arrives, the device's zone;
   * every time is written with its UTC offset, so either reads true.
   */
  const serverTimeZone = ref(Intl.DateTimeFormat().resolvedOptions().timeZone || 'UTC');
  let refreshing: Promise<boolean> | null = null;
  let timer: ReturnType<typeof setTimeout> | undefined;

  const signedIn = computed(() => user.value !== null);
  const isAdmin = computed(() => user.value?.isAdmin === true);
  /** The person's system of units on screen; metric before anyone signs in. */
  const units = computed<UnitSystem>(() => user.value?.units ?? DEFAULT_UNIT_SYSTEM);
  /** Figures in the person's units (shared/units/quantity.ts): every screen shows a quantity through this. */
  const quantities = computed(() => quantitiesIn(units.value));

  function accept(session: SessionDto) {
    serverUnreachable.value = false;
    user.value = session.user;
    token.value = session.token;
    serverTimeZone.value = session.timeZone;
    expiresAtMs.value = Date.parse(session.expiresAt);
    renewSocketToken(session.token);
    clearTimeout(timer);
    timer = setTimeout(() => void refresh(), Math.max(5_000, expiresAtMs.value - Date.now() - REFRESH_MARGIN_MS));
  }

  function clear() {
    clearTimeout(timer);
    disconnectSocket();
    // The boards kept for offline reading are this person's: gone with the session.
    clearSavedBoards();
    user.value = null;
    token.value = null;
    expiresAtMs.value = 0;
  }

  async function login(email: string, password: string) {
    endedReason.value = '';
    accept(await api('/auth/login', { method: 'POST', body: { email, password }, schema: sessionSchema, anonymous: true }));
  }

  /** Exchanges the refresh cookie for a new access token; concurrent callers share one request. */
  function refresh(): Promise<boolean> {
    refreshing ??= api('/auth/refresh', { method: 'POST', schema: sessionSchema, anonymous: true })
      .then((session) => {
        accept(session);
        return true;
      })
      .catch((error: unknown) => {
        // Only a refusal ends the session; a dropped network keeps the person signed in to retry.
        if (error instanceof ApiRequestError && (error.status === 401 || error.status === 403)) {
          const wasSignedIn = user.value !== null;
          // A saved board was open without a session (opened offline): the server is back and refused it.
          const wasOffline = serverUnreachable.value;
          serverUnreachable.value = false;
          clear();
          // Ended elsewhere (signed out in another tab of this browser, deactivated): to the sign-in page, saying so.
          if (wasSignedIn) {
            endedReason.value = error.message;
            sessionEndedHandler?.();
          } else if (wasOffline) sessionEndedHandler?.();
        } else {
          serverUnreachable.value = error instanceof ApiRequestError && (error.status === 0 || error.status >= 500);
          if (user.value) timer = setTimeout(() => void refresh(), 10_000);
        }
        return false;
      })
      .finally(() => {
        refreshing = null;
      });
    return refreshing;
  }

  /** At page load: a refresh cookie may still hold a session. */
  async function restore() {
    if (restored.value) return;
    await refresh();
    restored.value = true;
  }

  async function logout() {
    try {
      await api('/auth/logout', { method: 'POST', anonymous: true });
    } finally {
      clear();
    }
  }

  /** Saves the person's own choice of units; the answer replaces the person, so every screen follows at once. */
  async function setUnits(next: UnitSystem): Promise<void> {
    if (!user.value) return;
    const answer = await api(`/users/${encodeURIComponent(user.value.id)}/preferences`, { method: 'PATCH', body: { units: next }, schema: userEnvelopeSchema });
    user.value = answer.user;
  }

  /** Accepts a session handed over by an invitation or reset link. */
  function adopt(session: SessionDto) {
    accept(session);
    restored.value = true;
  }

  setTokenSource({
    async getToken() {
      if (token.value && Date.now() > expiresAtMs.value - REFRESH_MARGIN_MS / 2) await refresh();
      return token.value;
    },
    onUnauthorized: () => refresh(),
  });

  setSocketSession({
    refresh: () => refresh(),
    ended(reason) {
      endedReason.value = reason;
      clear();
      sessionEndedHandler?.();
    },
  });

  return { user, token, expiresAtMs, restored, serverUnreachable, endedReason, serverTimeZone, signedIn, isAdmin, units, quantities, login, refresh, restore, logout, adopt, setUnits };
});
