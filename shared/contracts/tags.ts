/**
 * Contracts of tag pages, the tag index, tag curation by moderators and the Atom feeds.
 *
 * Routes (all under /api):
 *
 *   GET    /tags?q=&state=&sort=            public     tagIndexQuerySchema → tagIndexSchema
 *   GET    /tags/:tagSlug                   public     → tagPageResponseSchema (a tag page, or a redirect)
 *   GET    /tags/:tagSlug/history           moderator  → tagHistorySchema (the tag's audit entries, newest first)
 *   POST   /tags/:tagSlug/approve           moderator  body tagReasonSchema (optional)     → tagCurationResultSchema
 *   POST   /tags/:tagSlug/reject            moderator  body tagRejectSchema                → tagCurationResultSchema
 *   PATCH  /tags/:tagSlug                   moderator  body tagEditSchema                  → tagCurationResultSchema
 *   POST   /tags/:tagSlug/merge             moderator  body tagMergeSchema                 → tagCurationResultSchema
 *   POST   /tags/:tagSlug/unmerge           moderator  body tagRequiredReasonSchema        → tagCurationResultSchema
 *   POST   /tags/:tagSlug/deprecate         moderator  body tagRequiredReasonSchema        → tagCurationResultSchema
 *   POST   /tags/:tagSlug/undeprecate       moderator  body tagReasonSchema (optional)     → tagCurationResultSchema
 *   GET    /feeds/tags/:tagSlug.atom        public     application/atom+xml (newest 50 lessons, errata, projects)
 *   GET    /feeds/projects/:slug.atom       public     application/atom+xml (newest 50 log entries and errata)
 *
 * Access: "moderator" means a site moderator or admin; anonymous callers get 401, members
 * (project owners and editors included) 403. Unsafe methods need the X-CSRF-Token header and a
 * same-origin Origin (403 csrf_failed otherwise).
 *
 * Visibility: tag pages, counts and feeds only show content the caller could read on its project
 * page — published, not hidden, not deleted projects for everyone; drafts (and hidden projects)
 * also for their owner and editors, and for admins. Hidden lessons and errata never appear.
 * Feeds are always answered as for an anonymous reader. Pending tags are shown only to
 * moderators and to the member who created them (404 for anyone else).
 *
 * Redirects: a merged tag's slug, an alias, or a slug a rename left behind answers
 * `GET /tags/:tagSlug` with status 200 and `{ kind: 'redirect', redirectTo, reason }`; the client
 * navigates to `redirectTo` (always a live tag, merge chains followed). The feeds answer such a slug
 * with a 301 to the feed of the surviving tag. Curation routes take only a tag's own slug.
 *
 * Curation rules:
 *   approve      pending → approved.
 *   reject       pending only. With `replaceWith` (an approved tag): the content carrying the
 *                rejected tag is retagged with it and the rejected slug is kept as its alias (the
 *                rejected tag is merged into it, so `unmerge` undoes it). Without: the tag and its
 *                uses are removed (not reversible; the audit entry keeps what was removed).
 *   PATCH        name and/or description. The slug stays unless `slug` is given; a new slug keeps
 *                the old one as an alias, so old links redirect. A slug or alias already in use → 409.
 *   merge        A into B: both live (not merged), A ≠ B, B approved. A's uses move to B in one
 *                transaction, A's slug becomes an alias of B. → 409 otherwise.
 *   unmerge      a merged tag only: its alias on the target is removed and the content it was taken
 *                from carries it again (the links remember the tag first applied).
 *   deprecate    approved → deprecated: lessons and errata keep it, but a save that adds it is
 *                refused (400 validation_failed, details.issues[0].path = 'tags').
 *   undeprecate  deprecated → approved.
 *   Every action writes an audit entry (action `tag.<verb>`, target kind `tag`, with before/after)
 *   in the same transaction as the change.
 *
 * Errors: 400 validation_failed (bad body or query), 401 unauthenticated, 403 forbidden /
 * csrf_failed, 404 not_found (unknown tag, or an unknown `into` / `replaceWith`), 409 conflict
 * (wrong state: approving an approved tag, merging into itself, into a merged or non-approved tag,
 * unmerging a tag that is not merged, a slug already taken).
 */
import { z } from 'zod';
import { erratumStatuses, severities, tagStates } from '../domain';
import { line, slugSchema } from '../text';

// ---------------------------------------------------------------------------------------------
// Shared pieces

export const tagSlugParamsSchema = z.strictObject({ tagSlug: slugSchema });

export const tagCountsSchema = z
  .object({
    lessons: z.number().int(),
    errata: z.number().int(),
    projects: z.number().int(),
    total: z.number().int(),
  })
  .meta({ id: 'TagCounts' });
export type TagCounts = z.infer<typeof tagCountsSchema>;

export const tagSummarySchema = z
  .object({
    slug: z.string(),
    name: z.string(),
    description: z.string(),
    state: z.enum(tagStates),
    /** Other slugs that lead to this tag (merged tags, renamed slugs, synonyms). */
    aliases: z.array(z.string()),
    counts: tagCountsSchema,
    createdAt: z.string(),
    updatedAt: z.string(),
  })
  .meta({ id: 'TagSummary' });
export type TagSummary = z.infer<typeof tagSummarySchema>;

// ---------------------------------------------------------------------------------------------
// Index

export const tagSorts = ['name', 'count', 'newest'] as const;
export type TagSort = (typeof tagSorts)[number];

export const tagIndexQuerySchema = z.strictObject({
  /** Matches name, slug and aliases (case-insensitive substring). */
  q: z.string().trim().max(60).default(''),
  /** Omitted: approved and deprecated (plus pending for moderators, and a member's own pending). */
  state: z.enum(tagStates).optional(),
  /** name: A→Z; count: most uses first (then name); newest: newest tag first. */
  sort: z.enum(tagSorts).default('name'),
});
export type TagIndexQuery = z.input<typeof tagIndexQuerySchema>;

export const tagIndexSchema = z
  .object({
    items: z.array(tagSummarySchema),
    viewer: z.object({ canCurate: z.boolean() }),
  })
  .meta({ id: 'TagIndex' });
export type TagIndex = z.infer<typeof tagIndexSchema>;

// ---------------------------------------------------------------------------------------------
// Tag page

const projectRefSchema = z.object({ slug: z.string(), title: z.string() });

/** Client routes: `url` is an app-relative path; the fields beside it allow named navigation. */
export const tagLessonItemSchema = z.object({
  id: z.number().int(),
  /** The lesson's opening as plain text (lessons have no title). */
  excerpt: z.string(),
  project: projectRefSchema,
  /** The tag as first applied, when it differs (content that came in by a merge). */
  viaSlug: z.string().nullable(),
  updatedAt: z.string(),
  url: z.string(),
});
export const tagErratumItemSchema = z.object({
  number: z.number().int(),
  code: z.string(),
  title: z.string(),
  severity: z.enum(severities),
  status: z.enum(erratumStatuses),
  project: projectRefSchema,
  viaSlug: z.string().nullable(),
  updatedAt: z.string(),
  url: z.string(),
});
export const tagProjectItemSchema = z.object({
  slug: z.string(),
  title: z.string(),
  summary: z.string(),
  /** Drafts only reach their members and admins. */
  status: z.enum(['draft', 'published']),
  viaSlug: z.string().nullable(),
  updatedAt: z.string(),
  url: z.string(),
});
export type TagLessonItem = z.infer<typeof tagLessonItemSchema>;
export type TagErratumItem = z.infer<typeof tagErratumItemSchema>;
export type TagProjectItem = z.infer<typeof tagProjectItemSchema>;

/** At most this many items per kind, newest first; `counts` are the full numbers. */
export const TAG_PAGE_ITEMS_PER_KIND = 100;

export const tagPageSchema = z
  .object({
    kind: z.literal('tag'),
    tag: tagSummarySchema,
    /** Tags merged into this one (each answered by a redirect here). */
    mergedFrom: z.array(z.object({ slug: z.string(), name: z.string() })),
    lessons: z.array(tagLessonItemSchema),
    errata: z.array(tagErratumItemSchema),
    projects: z.array(tagProjectItemSchema),
    /** Atom feed of this tag (app-relative). */
    feedUrl: z.string(),
    viewer: z.object({ canCurate: z.boolean() }),
  })
  .meta({ id: 'TagPage' });
export type TagPage = z.infer<typeof tagPageSchema>;

export const tagRedirectSchema = z
  .object({
    kind: z.literal('redirect'),
    redirectTo: z.string(),
    reason: z.enum(['merged', 'alias']),
  })
  .meta({ id: 'TagRedirect' });
export type TagRedirect = z.infer<typeof tagRedirectSchema>;

export const tagPageResponseSchema = z.discriminatedUnion('kind', [tagPageSchema, tagRedirectSchema]);
export type TagPageResponse = z.infer<typeof tagPageResponseSchema>;

// ---------------------------------------------------------------------------------------------
// Curation

const reason = line({ min: 1, max: 500, label: 'Reason' });

/** For approve and undeprecate the reason may be left out. */
export const tagReasonSchema = z.strictObject({ reason: line({ min: 0, max: 500, label: 'Reason' }).default('') });
export const tagRequiredReasonSchema = z.strictObject({ reason });

export const tagRejectSchema = z.strictObject({
  /** An approved tag that replaces the rejected one on its content. */
  replaceWith: slugSchema.optional(),
  reason,
});
export type TagRejectInput = z.input<typeof tagRejectSchema>;

export const tagEditSchema = z
  .strictObject({
    name: line({ min: 1, max: 60, label: 'Name' }).optional(),
    description: line({ min: 0, max: 500, label: 'Description' }).optional(),
    /** A new slug; the old one stays as an alias. */
    slug: slugSchema.optional(),
    reason: line({ min: 0, max: 500, label: 'Reason' }).default(''),
  })
  .refine((v) => v.name !== undefined || v.description !== undefined || v.slug !== undefined, {
    message: 'Change the name, the description or the slug',
  });
export type TagEditInput = z.input<typeof tagEditSchema>;

export const tagMergeSchema = z.strictObject({ into: slugSchema, reason });
export type TagMergeInput = z.input<typeof tagMergeSchema>;

export const tagCurationResultSchema = z
  .object({
    /** The tag acted on, as it is now (for reject without replacement: as it was, state unchanged). */
    tag: tagSummarySchema,
    /** Set after a merge or a reject with replacement: where the tag's content went. */
    mergedInto: z.string().nullable(),
    /** Uses moved (merge, reject with replacement, unmerge) or removed (reject without). */
    retagged: z.object({ lessons: z.number().int(), errata: z.number().int(), projects: z.number().int() }),
    removed: z.boolean(),
  })
  .meta({ id: 'TagCurationResult' });
export type TagCurationResult = z.infer<typeof tagCurationResultSchema>;

export const tagHistorySchema = z
  .object({
    items: z.array(
      z.object({
        id: z.number().int(),
        action: z.string(),
        actor: z.object({ handle: z.string(), displayName: z.string() }).nullable(),
        before: z.unknown(),
        after: z.unknown(),
        reason: z.string(),
        at: z.string(),
      }),
    ),
  })
  .meta({ id: 'TagHistory' });
export type TagHistory = z.infer<typeof tagHistorySchema>;

/** Feed route parameters (Express matches `:tagSlug.atom`). */
export const tagFeedParamsSchema = tagSlugParamsSchema;
export const FEED_ITEM_LIMIT = 50;
