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
  { path: '/search', name: 'search', component: () => import('@/pages/SearchPage.vue'), meta: { title: 'Search' } },
  { path: '/sign-in', name: 'sign-in', component: () => import('@/pages/SignInPage.vue'), meta: { title: 'Sign in' } },
  { path: '/unsubscribe', name: 'unsubscribe', component: () => import('@/pages/UnsubscribePage.vue'), meta: { title: 'Unsubscribe' } },
  { path: '/dev/outbox', name: 'dev-outbox', component: () => import('@/pages/DevOutboxPage.vue'), meta: { title: 'Outbox' } },
  {
    path: '/me/projects',
    name: 'my-projects',
    component: () => import('@/pages/MyProjectsPage.vue'),
    meta: { requires: 'signed-in', title: 'My projects' },
  },
  {
    path: '/new',
    name: 'project-new',
    component: () => import('@/pages/ProjectNewPage.vue'),
    meta: { requires: 'signed-in', title: 'New project' },
  },
  { path: '/projects/:slug', name: 'project', component: () => import('@/pages/ProjectPage.vue') },
  {
    path: '/projects/:slug/settings',
    name: 'project-settings',
    component: () => import('@/pages/ProjectSettingsPage.vue'),
    meta: { requires: 'signed-in', title: 'Project settings' },
  },
  {
    path: '/projects/:slug/history',
    name: 'project-history',
    component: () => import('@/pages/ProjectHistoryPage.vue'),
    meta: { title: 'Details history' },
  },
  {
    path: '/projects/:slug/gallery',
    name: 'project-gallery',
    component: () => import('@/pages/ProjectGalleryPage.vue'),
    meta: { title: 'Photos and files' },
  },
  {
    path: '/projects/:slug/pin-maps',
    name: 'project-pin-maps',
    component: () => import('@/pages/ProjectPinMapsPage.vue'),
    meta: { title: 'Pin maps' },
  },
  {
    path: '/projects/:slug/memory',
    name: 'project-memory',
    component: () => import('@/pages/ProjectMemoryPage.vue'),
    meta: { title: 'Memory budget' },
  },
  { path: '/projects/:slug/log/:documentId', name: 'log-entry', component: () => import('@/pages/LogEntryPage.vue') },
  {
    path: '/projects/:slug/documents/:documentId/edit',
    name: 'document-edit',
    component: () => import('@/pages/DocumentEditPage.vue'),
    meta: { requires: 'signed-in', title: 'Editing' },
  },
  {
    path: '/projects/:slug/documents/:documentId/history',
    name: 'document-history',
    component: () => import('@/pages/DocumentHistoryPage.vue'),
    meta: { title: 'History' },
  },
  {
    path: '/projects/:slug/errata',
    name: 'project-errata',
    component: () => import('@/pages/ProjectErrataPage.vue'),
    meta: { title: 'Errata' },
  },
  // Before the `:code` routes, or "new" would be read as an erratum code.
  {
    path: '/projects/:slug/errata/new',
    name: 'erratum-new',
    component: () => import('@/pages/ErratumEditPage.vue'),
    meta: { requires: 'signed-in', title: 'New erratum' },
  },
  { path: '/projects/:slug/errata/:code', name: 'erratum', component: () => import('@/pages/ErratumPage.vue') },
  {
    path: '/projects/:slug/errata/:code/edit',
    name: 'erratum-edit',
    component: () => import('@/pages/ErratumEditPage.vue'),
    meta: { requires: 'signed-in', title: 'Editing an erratum' },
  },
  {
    path: '/projects/:slug/errata/:code/history',
    name: 'erratum-history',
    component: () => import('@/pages/ErratumHistoryPage.vue'),
    meta: { title: 'Erratum history' },
  },
  {
    path: '/admin/users',
    name: 'admin-users',
    component: () => import('@/pages/AdminUsersPage.vue'),
    meta: { requires: 'admin', title: 'Members and roles' },
  },
  {
    path: '/admin/projects',
    name: 'admin-deleted-projects',
    component: () => import('@/pages/AdminDeletedProjectsPage.vue'),
    meta: { requires: 'admin', title: 'Deleted projects' },
  },
  {
    path: '/projects/:slug/propose/erratum',
    name: 'proposal-new-erratum',
    component: () => import('@/pages/ProposeErratumPage.vue'),
    meta: { requires: 'signed-in', title: 'Propose an erratum' },
  },
  {
    path: '/projects/:slug/errata/:code/propose',
    name: 'proposal-edit-erratum',
    component: () => import('@/pages/ProposeErratumEditPage.vue'),
    meta: { requires: 'signed-in', title: 'Propose an edit' },
  },
  {
    path: '/projects/:slug/documents/:documentId/propose',
    name: 'proposal-edit-document',
    component: () => import('@/pages/ProposeDocumentEditPage.vue'),
    meta: { requires: 'signed-in', title: 'Propose an edit' },
  },
  {
    path: '/proposals/:proposalId',
    name: 'proposal',
    component: () => import('@/pages/ProposalPage.vue'),
    meta: { title: 'Proposal' },
  },
  {
    path: '/me/review',
    name: 'review-queue',
    component: () => import('@/pages/ReviewQueuePage.vue'),
    meta: { requires: 'signed-in', title: 'Proposals to review' },
  },
  {
    path: '/me/proposals',
    name: 'my-proposals',
    component: () => import('@/pages/MyProposalsPage.vue'),
    meta: { requires: 'signed-in', title: 'My proposals' },
  },
  {
    path: '/me/notifications',
    name: 'notifications',
    component: () => import('@/pages/NotificationsPage.vue'),
    meta: { requires: 'signed-in', title: 'Notifications' },
  },
  {
    path: '/me/settings/notifications',
    name: 'notification-settings',
    component: () => import('@/pages/NotificationSettingsPage.vue'),
    meta: { requires: 'signed-in', title: 'Notification settings' },
  },
  { path: '/parts', name: 'parts', component: () => import('@/pages/PartsPage.vue'), meta: { title: 'Parts' } },
  { path: '/parts/:partSlug', name: 'part', component: () => import('@/pages/PartPage.vue'), meta: { title: 'Part' } },
  {
    path: '/tools/level-check',
    name: 'level-check',
    component: () => import('@/pages/LevelCheckPage.vue'),
    meta: { title: 'Level check' },
  },
  { path: '/tags', name: 'tags', component: () => import('@/pages/TagsPage.vue'), meta: { title: 'Tags' } },
  { path: '/tags/:tagSlug', name: 'tag', component: () => import('@/pages/TagPage.vue'), meta: { title: 'Tag' } },
  {
    path: '/moderation',
    name: 'moderation-queue',
    component: () => import('@/pages/ModerationQueuePage.vue'),
    meta: { requires: 'moderator', title: 'Flagged content' },
  },
  {
    path: '/moderation/tags',
    name: 'moderation-tags',
    component: () => import('@/pages/ModerationTagsPage.vue'),
    meta: { requires: 'moderator', title: 'Tag curation' },
  },
  {
    path: '/moderation/audit',
    name: 'audit-log',
    component: () => import('@/pages/AuditLogPage.vue'),
    meta: { requires: 'moderator', title: 'Audit log' },
  },
  {
    path: '/:pathMatch(.*)*',
    name: 'not-found',
    component: () => import('@/pages/NotFoundPage.vue'),
    meta: { title: 'Not found' },
  },
] as const satisfies readonly RouteRecordRaw[];
