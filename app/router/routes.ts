/**
 * The route table. Names are typed (see typed-routes.d.ts): components navigate with
 * `{ name, params }`, never with string-built paths.
 */
import type { RouteRecordRaw } from 'vue-router';

export type Requirement = 'signed-in' | 'moderator' | 'admin';

declare module 'vue-router' {
  interface RouteMeta {
    /** Who may open the page; the shell shows a sign-in or 403 page to anyone else. */
    requires?: Requirement;
    title?: string;
  }
}

export const routes = [
  { path: '/', name: 'home', component: () => import('@/pages/HomePage.vue'), meta: { title: 'Reworkbook' } },
  { path: '/sign-in', name: 'sign-in', component: () => import('@/pages/SignInPage.vue'), meta: { title: 'Sign in' } },
  {
    path: '/admin/users',
    name: 'admin-users',
    component: () => import('@/pages/AdminUsersPage.vue'),
    meta: { requires: 'admin', title: 'Members and roles' },
  },
  {
    path: '/:pathMatch(.*)*',
    name: 'not-found',
    component: () => import('@/pages/NotFoundPage.vue'),
    meta: { title: 'Not found' },
  },
] as const satisfies readonly RouteRecordRaw[];
