import { createRouter, createWebHistory } from 'vue-router';
import { useSessionStore, whenSessionEnded } from '../stores/session';
import { routes } from './routes';

export const router = createRouter({ history: createWebHistory(), routes });

// Signs people in before any private screen and keeps non-admins out of admin screens.
router.beforeEach(async (to) => {
  const session = useSessionStore();
  await session.restore();
  if (to.meta.public) return true;
  if (!session.signedIn) return { name: 'sign-in', query: to.fullPath !== '/' ? { next: to.fullPath } : {} };
  if (to.meta.admin && !session.isAdmin) return { name: 'jobs' };
  return true;
});

// The server ended the session while a screen was open (signed out on this device, deactivated): to the sign-in page, which says why.
whenSessionEnded(() => {
  const here = router.currentRoute.value;
  if (!here.meta.public) void router.replace({ name: 'sign-in', query: here.fullPath !== '/' ? { next: here.fullPath } : {} });
});

router.afterEach((to) => {
  document.title = to.meta.title ? `${to.meta.title} · Holdline` : 'Holdline';
});
