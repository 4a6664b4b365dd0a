import type { RouteRecordRaw } from 'vue-router';

declare module 'vue-router' {
  interface RouteMeta {
    /** Reachable without signing in. */
    public?: boolean;
    /** Only for admins. */
    admin?: boolean;
    title?: string;
  }
}

/** Every screen, loaded lazily; the catch-all stays last. */
export const routes: RouteRecordRaw[] = [
  { path: '/sign-in', name: 'sign-in', component: () => import('../pages/auth/SignInPage.vue'), meta: { public: true, title: 'Sign in' } },
  {
    path: '/forgot-password',
    name: 'forgot-password',
    component: () => import('../pages/auth/ForgotPasswordPage.vue'),
    meta: { public: true, title: 'Reset your password' },
  },
  {
    path: '/set-password',
    name: 'set-password',
    component: () => import('../pages/auth/SetPasswordPage.vue'),
    meta: { public: true, title: 'Set your password' },
  },
  {
    path: '/',
    component: () => import('../layouts/MainLayout.vue'),
    children: [
      { path: '', redirect: { name: 'jobs' } },
      { path: 'jobs', name: 'jobs', component: () => import('../pages/jobs/JobListPage.vue'), meta: { title: 'Jobs' } },
      { path: 'fleet', name: 'fleet', component: () => import('../pages/fleet/FleetPage.vue'), meta: { title: 'Fleet' } },
      { path: 'records', name: 'records', component: () => import('../pages/records/RecordsPage.vue'), meta: { title: 'Records' } },
      { path: 'people', name: 'people', component: () => import('../pages/people/PeoplePage.vue'), meta: { title: 'People', admin: true } },
    ],
  },
  { path: '/:pathMatch(.*)*', name: 'not-found', component: () => import('../pages/NotFoundPage.vue'), meta: { public: true, title: 'Not found' } },
];
