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
      {
        // Nested, so the navigation keeps Jobs marked on a job's page.
        path: 'jobs',
        children: [
          { path: '', name: 'jobs', component: () => import('../pages/jobs/JobListPage.vue'), meta: { title: 'Jobs' } },
          { path: ':id', name: 'job', component: () => import('../pages/jobs/JobPage.vue'), meta: { title: 'Job' } },
          // A job's record lives under its job (the navigation marks Jobs); the page links back to Records.
          { path: ':id/record', name: 'job-record', component: () => import('../pages/records/JobRecordPage.vue'), meta: { title: 'Record' } },
        ],
      },
      {
        path: 'fleet',
        children: [
          { path: '', name: 'fleet', component: () => import('../pages/fleet/FleetPage.vue'), meta: { title: 'Fleet' } },
          { path: 'units/:id', name: 'fleet-unit', component: () => import('../pages/fleet/UnitDetailPage.vue'), meta: { title: 'Crane unit' } },
          { path: 'models/:id', name: 'fleet-model', component: () => import('../pages/fleet/ModelDetailPage.vue'), meta: { title: 'Crane model' } },
          {
            path: 'assist-cranes/:id',
            name: 'fleet-assist-crane',
            component: () => import('../pages/fleet/AssistCraneDetailPage.vue'),
            meta: { title: 'Assist crane' },
          },
          { path: 'components', name: 'fleet-components', component: () => import('../pages/fleet/ComponentListPage.vue'), meta: { title: 'Components' } },
          { path: 'components/:id', name: 'fleet-component', component: () => import('../pages/fleet/ComponentDetailPage.vue'), meta: { title: 'Component' } },
        ],
      },
      { path: 'records', name: 'records', component: () => import('../pages/records/RecordsPage.vue'), meta: { title: 'Records' } },
      { path: 'people', name: 'people', component: () => import('../pages/people/PeoplePage.vue'), meta: { title: 'People', admin: true } },
    ],
  },
  {
    // The live board's views of one job; /jobs/:id itself stays the planning page above.
    path: '/jobs/:id',
    component: () => import('../layouts/BoardLayout.vue'),
    children: [
      { path: 'board', name: 'board', component: () => import('../pages/board/BoardPage.vue'), meta: { title: 'Board' } },
      { path: 'cab', name: 'cab', component: () => import('../pages/board/CabPage.vue'), meta: { title: 'Cab' } },
      { path: 'signaller', name: 'signaller', component: () => import('../pages/board/SignallerPage.vue'), meta: { title: 'Signaller' } },
      { path: 'rigger', name: 'rigger', component: () => import('../pages/board/RiggerPage.vue'), meta: { title: 'Rigger checklist' } },
      { path: 'console', name: 'console', component: () => import('../pages/board/ConsolePage.vue'), meta: { title: 'Supervisor console' } },
      { path: 'display', name: 'display', component: () => import('../pages/board/DisplayPage.vue'), meta: { title: 'Site display' } },
    ],
  },
  { path: '/jobs/:id/open', name: 'board-open', component: () => import('../pages/board/BoardEntryPage.vue'), meta: { title: 'Opening job' } },
  { path: '/:pathMatch(.*)*', name: 'not-found', component: () => import('../pages/NotFoundPage.vue'), meta: { public: true, title: 'Not found' } },
];
