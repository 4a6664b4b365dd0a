import { createRouter, createWebHistory, type RouteLocationNormalized, type RouteLocationRaw } from 'vue-router';
import { latestSavedBoard, savedBoardEntry } from '../services/saved-boards';
import { useSessionStore, whenSessionEnded } from '../stores/session';
import { routes } from './routes';

export const router = createRouter({ history: createWebHistory(), routes });

// Signs people in before any private screen and keeps non-admins out of admin screens.
router.beforeEach(async (to, from) => {
  const session = useSessionStore();
  await session.restore();
  if (to.meta.public) return true;
  if (!session.signedIn) {
    const offline = session.serverUnreachable ? savedBoardRoute(to, from) : null;
    if (offline) return offline;
    return { name: 'sign-in', query: to.fullPath !== '/' ? { next: to.fullPath } : {} };
  }
  if (to.meta.admin && !session.isAdmin) return { name: 'jobs' };
  return true;
});

const BOARD_VIEWS = new Set(['board', 'cab', 'signaller', 'rigger', 'console', 'display']);

/**
 * With no answer from the server, nobody can sign in; a board this device saved is shown instead,
 * not live (stores/board.ts): the board view asked for when it is saved, and an app opened or
 * reloaded offline anywhere else goes to the board saved most recently. Null: the sign-in page.
 */
function savedBoardRoute(to: RouteLocationNormalized, from: RouteLocationNormalized): true | RouteLocationRaw | null {
  if (typeof to.name === 'string' && BOARD_VIEWS.has(to.name) && savedBoardEntry(String(to.params.id))) return true;
  // The job's QR code: the view its board was saved from.
  const scanned = to.name === 'board-open' ? savedBoardEntry(String(to.params.id)) : null;
  if (scanned) return { name: BOARD_VIEWS.has(scanned.view) ? scanned.view : 'board', params: { id: scanned.jobId } };
  // Only when the app starts (launched from the home screen, reloaded): a tap on a link still goes where it says.
  const starting = from.matched.length === 0;
  const latest = starting ? latestSavedBoard() : null;
  return latest ? { name: BOARD_VIEWS.has(latest.view) ? latest.view : 'board', params: { id: latest.jobId } } : null;
}

// The server ended the session while a screen was open (signed out on this device, deactivated): to the sign-in page, which says why.
whenSessionEnded(() => {
  const here = router.currentRoute.value;
  if (!here.meta.public) void router.replace({ name: 'sign-in', query: here.fullPath !== '/' ? { next: here.fullPath } : {} });
});

router.afterEach((to) => {
  document.title = to.meta.title ? `${to.meta.title} · Holdline` : 'Holdline';
});
