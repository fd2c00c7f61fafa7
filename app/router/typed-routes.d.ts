import type { RouteRecordInfo } from 'vue-router';

type NoParams = Record<never, never>;
type Slug = { slug: string };
type SlugDoc = { slug: string; documentId: string | number };
type SlugDocOut = { slug: string; documentId: string };
/** An erratum by project and code (`E3`). */
type SlugCode = { slug: string; code: string };

/** Every named route with its params; keep in step with routes.ts. */
export interface RouteNamedMap {
  home: RouteRecordInfo<'home', '/', NoParams, NoParams>;
  search: RouteRecordInfo<'search', '/search', NoParams, NoParams>;
  'sign-in': RouteRecordInfo<'sign-in', '/sign-in', NoParams, NoParams>;
  unsubscribe: RouteRecordInfo<'unsubscribe', '/unsubscribe', NoParams, NoParams>;
  'dev-outbox': RouteRecordInfo<'dev-outbox', '/dev/outbox', NoParams, NoParams>;
  'my-projects': RouteRecordInfo<'my-projects', '/me/projects', NoParams, NoParams>;
  'project-new': RouteRecordInfo<'project-new', '/new', NoParams, NoParams>;
  project: RouteRecordInfo<'project', '/projects/:slug', Slug, Slug>;
  'project-settings': RouteRecordInfo<'project-settings', '/projects/:slug/settings', Slug, Slug>;
  'project-history': RouteRecordInfo<'project-history', '/projects/:slug/history', Slug, Slug>;
  'project-gallery': RouteRecordInfo<'project-gallery', '/projects/:slug/gallery', Slug, Slug>;
  'project-pin-maps': RouteRecordInfo<'project-pin-maps', '/projects/:slug/pin-maps', Slug, Slug>;
  'project-memory': RouteRecordInfo<'project-memory', '/projects/:slug/memory', Slug, Slug>;
  'log-entry': RouteRecordInfo<'log-entry', '/projects/:slug/log/:documentId', SlugDoc, SlugDocOut>;
  'document-edit': RouteRecordInfo<'document-edit', '/projects/:slug/documents/:documentId/edit', SlugDoc, SlugDocOut>;
  'document-history': RouteRecordInfo<
    'document-history',
    '/projects/:slug/documents/:documentId/history',
    SlugDoc,
    SlugDocOut
  >;
  'project-errata': RouteRecordInfo<'project-errata', '/projects/:slug/errata', Slug, Slug>;
  'erratum-new': RouteRecordInfo<'erratum-new', '/projects/:slug/errata/new', Slug, Slug>;
  erratum: RouteRecordInfo<'erratum', '/projects/:slug/errata/:code', SlugCode, SlugCode>;
  'erratum-edit': RouteRecordInfo<'erratum-edit', '/projects/:slug/errata/:code/edit', SlugCode, SlugCode>;
  'erratum-history': RouteRecordInfo<'erratum-history', '/projects/:slug/errata/:code/history', SlugCode, SlugCode>;
  'admin-users': RouteRecordInfo<'admin-users', '/admin/users', NoParams, NoParams>;
  'admin-deleted-projects': RouteRecordInfo<'admin-deleted-projects', '/admin/projects', NoParams, NoParams>;
  'proposal-new-erratum': RouteRecordInfo<'proposal-new-erratum', '/projects/:slug/propose/erratum', Slug, Slug>;
  'proposal-edit-erratum': RouteRecordInfo<
    'proposal-edit-erratum',
    '/projects/:slug/errata/:code/propose',
    { slug: string; code: string },
    { slug: string; code: string }
  >;
  'proposal-edit-document': RouteRecordInfo<
    'proposal-edit-document',
    '/projects/:slug/documents/:documentId/propose',
    SlugDoc,
    SlugDocOut
  >;
  proposal: RouteRecordInfo<
    'proposal',
    '/proposals/:proposalId',
    { proposalId: string | number },
    { proposalId: string }
  >;
  'review-queue': RouteRecordInfo<'review-queue', '/me/review', NoParams, NoParams>;
  'my-proposals': RouteRecordInfo<'my-proposals', '/me/proposals', NoParams, NoParams>;
  notifications: RouteRecordInfo<'notifications', '/me/notifications', NoParams, NoParams>;
  'notification-settings': RouteRecordInfo<'notification-settings', '/me/settings/notifications', NoParams, NoParams>;
  parts: RouteRecordInfo<'parts', '/parts', NoParams, NoParams>;
  part: RouteRecordInfo<'part', '/parts/:partSlug', { partSlug: string }, { partSlug: string }>;
  'level-check': RouteRecordInfo<'level-check', '/tools/level-check', NoParams, NoParams>;
  tags: RouteRecordInfo<'tags', '/tags', NoParams, NoParams>;
  tag: RouteRecordInfo<'tag', '/tags/:tagSlug', { tagSlug: string }, { tagSlug: string }>;
  'moderation-queue': RouteRecordInfo<'moderation-queue', '/moderation', NoParams, NoParams>;
  'moderation-tags': RouteRecordInfo<'moderation-tags', '/moderation/tags', NoParams, NoParams>;
  'audit-log': RouteRecordInfo<'audit-log', '/moderation/audit', NoParams, NoParams>;
  'not-found': RouteRecordInfo<
    'not-found',
    '/:pathMatch(.*)*',
    { pathMatch?: string | string[] },
    { pathMatch: string[] }
  >;
}

declare module 'vue-router' {
  interface TypesConfig {
    RouteNamedMap: RouteNamedMap;
  }
}
