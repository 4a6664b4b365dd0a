import { createRouter, createWebHistory } from 'vue-router';
import { useSessionStore } from '../stores/session';
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

router.afterEach((to) => {
  document.title = to.meta.title ? `${to.meta.title} · Holdline` : 'Holdline';
});
