/**
 * Contracts of flags, the moderation queue, hiding and restoring content, and the audit log.
 *
 * Routes (all under /api; unsafe methods need X-CSRF-Token and a same-origin Origin, else 403 csrf_failed):
 *
 * - `POST /flags` (signed-in member; own budget, 429 rate_limited) body `createFlagSchema`
 *   → 201 `flagCreatedSchema` with `repeated: false`;
 *   → 200 `flagCreatedSchema` with `repeated: true` and the member's existing open flag when they
 *     already flag that target (repeated flags count once; the reason and text of the first stay).
 *   400 validation_failed; 401 unauthenticated; 403 forbidden (flagging your own content);
 *   404 not_found (no such target, or one the member cannot read, e.g. another's draft).
 * - `GET /moderation/flags?state=open&page=1` (moderator, admin) → `flagQueueSchema`: flags of that
 *   state grouped by target, most flagged first then oldest first, with the target in context.
 * - `GET /moderation/targets/:targetKind/:targetId` (moderator, admin) → `moderationTargetDetailSchema`:
 *   one target in context with all its flags (any state). 404 not_found.
 * - `POST /moderation/targets/:targetKind/:targetId/hide` (moderator, admin) body `hideTargetSchema`
 *   → 200 `moderationActionResultSchema`; sets the public reason, marks the target's open flags
 *   `actioned`, writes one audit entry (`content.hide`). 404 not_found; 409 conflict (already hidden).
 * - `POST /moderation/targets/:targetKind/:targetId/restore` (moderator, admin) body `restoreTargetSchema`
 *   → 200 `moderationActionResultSchema`; clears the reason, marks open flags `actioned`, audit
 *   `content.restore`. 404 not_found; 409 conflict (not hidden).
 * - `POST /moderation/flags/:flagId/dismiss` (moderator, admin) body `dismissFlagSchema`
 *   → 200 `flagSchema` (state `dismissed`), audit `flag.dismiss`. 404 not_found; 409 conflict (not open).
 * - `GET /audit?q=&action=&actor=&targetKind=&targetId=&page=` (moderator, admin) → `auditListSchema`,
 *   newest first. `q` matches the action, the reason, the target id and the actor's handle.
 * - `GET /audit/for/:targetKind/:targetId` (moderators and admins; also the content's author and the
 *   owner of its project) → `auditListSchema` of that content's moderation history, newest first.
 *   For the author and owner `actor` is null (moderators act for the site, not in their own name).
 *   401 unauthenticated; 403 forbidden; 404 not_found (no such content).
 *
 * The audit log is append-only: no route changes or removes an entry (other methods answer 404).
 *
 * Hidden content, as every read API answers it. Moderators and admins still receive it, marked
 * with `hidden: { reason, at }`, and so do the people who answer for it: the project's owner and
 * editors for the project, its documents, errata, lessons and photos (and a photo's uploader);
 * only the author for a comment or a proposal (members write those on others' projects).
 * Everyone else:
 * - a hidden project, write-up section or log entry (document), erratum or proposal read by itself
 *   answers 410 `gone` with `details: { hidden: { reason, at } }`, so the page can show the reason
 *   in place of the content (a draft the reader may not see stays 404 first);
 * - a hidden photo or file answers 410 `gone` on its file routes;
 * - lists leave hidden sections, log entries, errata, lessons, proposals and photos out;
 * - a hidden comment stays in its thread as a placeholder: empty `body` and `html`, with `hidden`.
 * Hidden content never appears in search. The `hidden` field on the existing read contracts
 * (projects, documents, errata, lessons, proposals, comments, uploads) is `HiddenInfo | null`.
 */
import { z } from 'zod';
import { flagReasons, flagStates } from '../domain';
import { line, prose } from '../text';
import { userSummarySchema } from './users';

/** What a flag can point at. Sections and log entries are both `document`; a photo is an `upload`. */
export const flagTargetKinds = ['project', 'document', 'erratum', 'lesson', 'comment', 'proposal', 'upload'] as const;
export type FlagTargetKind = (typeof flagTargetKinds)[number];
export const flagTargetKindLabels: Record<FlagTargetKind, string> = {
  project: 'Project',
  document: 'Write-up section or log entry',
  erratum: 'Erratum',
  lesson: 'Lesson',
  comment: 'Comment',
  proposal: 'Proposal',
  upload: 'Photo or file',
};

export type FlagReason = (typeof flagReasons)[number];
export const flagReasonLabels: Record<FlagReason, string> = {
  wrong: 'Technically wrong or misleading',
  unsafe: 'Unsafe advice',
  spam: 'Spam or advertising',
  abusive: 'Abusive or harassing',
  copyright: 'Copied without permission',
  other: 'Something else',
};
export type FlagState = (typeof flagStates)[number];

export const targetIdSchema = z.coerce.number().int().min(1).max(2_147_483_647);

/** `hidden` on any read answer: the public reason shown in place of the content. */
export const hiddenInfoSchema = z.object({ reason: z.string(), at: z.string() }).meta({ id: 'HiddenInfo' });
export type HiddenInfo = z.infer<typeof hiddenInfoSchema>;

// ---------------------------------------------------------------------------------------------
// Flags

export const createFlagSchema = z
  .strictObject({
    targetKind: z.enum(flagTargetKinds),
    targetId: targetIdSchema,
    reason: z.enum(flagReasons),
    text: prose({ max: 2000, label: 'Details' }).default(''),
  })
  .refine((f) => f.reason !== 'other' || f.text.trim().length > 0, {
    path: ['text'],
    message: 'Say what is wrong when choosing "Something else"',
  })
  .meta({ id: 'CreateFlag' });
export type CreateFlag = z.input<typeof createFlagSchema>;

export const flagSchema = z
  .object({
    id: z.number().int(),
    targetKind: z.enum(flagTargetKinds),
    targetId: z.number().int(),
    reason: z.enum(flagReasons),
    text: z.string(),
    state: z.enum(flagStates),
    createdAt: z.string(),
    handledAt: z.string().nullable(),
  })
  .meta({ id: 'Flag' });
export type Flag = z.infer<typeof flagSchema>;

export const flagCreatedSchema = z
  .object({
    flag: flagSchema,
    /** True when the member had already flagged this target: the existing flag is returned. */
    repeated: z.boolean(),
  })
  .meta({ id: 'FlagCreated' });
export type FlagCreated = z.infer<typeof flagCreatedSchema>;

/** A flag as moderators see it: with who raised it and who handled it. */
export const queueFlagSchema = flagSchema
  .extend({ author: userSummarySchema, handledBy: userSummarySchema.nullable() })
  .meta({ id: 'QueueFlag' });
export type QueueFlag = z.infer<typeof queueFlagSchema>;

// ---------------------------------------------------------------------------------------------
// Targets in context

/**
 * Where the client shows the target: a named client route with its params (navigate with
 * `{ name, params }`). `hash` names an element on that page (`comment-12`, `lesson-4`,
 * `section-7`).
 */
export const targetLinkSchema = z
  .discriminatedUnion('name', [
    z.object({ name: z.literal('project'), params: z.object({ slug: z.string() }), hash: z.string().optional() }),
    z.object({
      name: z.literal('log-entry'),
      params: z.object({ slug: z.string(), documentId: z.string() }),
      hash: z.string().optional(),
    }),
    z.object({
      name: z.literal('erratum'),
      params: z.object({ slug: z.string(), code: z.string() }),
      hash: z.string().optional(),
    }),
    z.object({
      name: z.literal('proposal'),
      params: z.object({ proposalId: z.string() }),
      hash: z.string().optional(),
    }),
    z.object({
      name: z.literal('project-gallery'),
      params: z.object({ slug: z.string() }),
      hash: z.string().optional(),
    }),
  ])
  .meta({ id: 'TargetLink' });
export type TargetLink = z.infer<typeof targetLinkSchema>;

export const moderationTargetSchema = z
  .object({
    kind: z.enum(flagTargetKinds),
    id: z.number().int(),
    /** "Bench supply", "E3 Relay never switches", "Comment by ilse-marrow", a photo's file name. */
    title: z.string(),
    /** The first few hundred characters of the text, as plain text (no Markdown rendering). */
    excerpt: z.string(),
    project: z.object({ slug: z.string(), title: z.string() }).nullable(),
    /** Who wrote it (for a project: its owner). */
    author: userSummarySchema.nullable(),
    /** Null when the target has no page of its own to open (e.g. its project was deleted). */
    link: targetLinkSchema.nullable(),
    hidden: hiddenInfoSchema.nullable(),
  })
  .meta({ id: 'ModerationTarget' });
export type ModerationTarget = z.infer<typeof moderationTargetSchema>;

export const targetParamsSchema = z.strictObject({ targetKind: z.enum(flagTargetKinds), targetId: targetIdSchema });
export const flagParamsSchema = z.strictObject({ flagId: targetIdSchema });

// ---------------------------------------------------------------------------------------------
// Queue

export const flagQueueQuerySchema = z.strictObject({
  state: z.enum(flagStates).default('open'),
  page: z.coerce.number().int().min(1).max(10_000).default(1),
});
export type FlagQueueQuery = z.input<typeof flagQueueQuerySchema>;

export const flagGroupSchema = z
  .object({
    target: moderationTargetSchema,
    /** Flags in the queried state on this target (one per member while open). */
    flagCount: z.number().int(),
    reasons: z.array(z.object({ reason: z.enum(flagReasons), count: z.number().int() })),
    flags: z.array(queueFlagSchema),
    firstFlaggedAt: z.string(),
    lastFlaggedAt: z.string(),
  })
  .meta({ id: 'FlagGroup' });
export type FlagGroup = z.infer<typeof flagGroupSchema>;

export const flagQueueSchema = z
  .object({
    items: z.array(flagGroupSchema),
    /** Number of targets (groups), not flags. */
    total: z.number().int(),
    page: z.number().int(),
    pageSize: z.number().int(),
  })
  .meta({ id: 'FlagQueue' });
export type FlagQueue = z.infer<typeof flagQueueSchema>;

export const moderationTargetDetailSchema = z
  .object({ target: moderationTargetSchema, flags: z.array(queueFlagSchema) })
  .meta({ id: 'ModerationTargetDetail' });
export type ModerationTargetDetail = z.infer<typeof moderationTargetDetailSchema>;

// ---------------------------------------------------------------------------------------------
// Actions

export const hideTargetSchema = z
  .strictObject({ reason: line({ min: 3, max: 500, label: 'Public reason' }) })
  .meta({ id: 'HideTarget' });
export type HideTarget = z.input<typeof hideTargetSchema>;

export const restoreTargetSchema = z
  .strictObject({ reason: line({ min: 0, max: 500, label: 'Reason' }).default('') })
  .meta({ id: 'RestoreTarget' });
export type RestoreTarget = z.input<typeof restoreTargetSchema>;

export const dismissFlagSchema = z
  .strictObject({ reason: line({ min: 0, max: 500, label: 'Reason' }).default('') })
  .meta({ id: 'DismissFlag' });
export type DismissFlag = z.input<typeof dismissFlagSchema>;

export const moderationActionResultSchema = z
  .object({
    target: moderationTargetSchema,
    /** How many open flags the action closed as `actioned`. */
    actionedFlags: z.number().int(),
  })
  .meta({ id: 'ModerationActionResult' });
export type ModerationActionResult = z.infer<typeof moderationActionResultSchema>;

// ---------------------------------------------------------------------------------------------
// Audit log

/** Actions this feature writes; others (`user.role`, `user.suspend`, tag curation …) appear too. */
export const moderationAuditActions = ['content.hide', 'content.restore', 'flag.dismiss'] as const;

export const auditQuerySchema = z.strictObject({
  q: z.string().trim().max(100).optional(),
  action: z.string().trim().min(1).max(60).optional(),
  /** The actor's handle. */
  actor: z.string().trim().min(1).max(39).optional(),
  targetKind: z.string().trim().min(1).max(40).optional(),
  targetId: z.string().trim().min(1).max(80).optional(),
  page: z.coerce.number().int().min(1).max(10_000).default(1),
});
export type AuditQuery = z.input<typeof auditQuerySchema>;

export const auditForParamsSchema = targetParamsSchema;

export const auditEntrySchema = z
  .object({
    id: z.number().int(),
    action: z.string(),
    /** Null for system actions, and for authors and owners reading their content's history. */
    actor: userSummarySchema.nullable(),
    targetKind: z.string(),
    targetId: z.string(),
    projectId: z.number().int().nullable(),
    before: z.unknown(),
    after: z.unknown(),
    reason: z.string(),
    at: z.string(),
  })
  .meta({ id: 'AuditEntry' });
export type AuditEntryView = z.infer<typeof auditEntrySchema>;

export const auditListSchema = z
  .object({
    items: z.array(auditEntrySchema),
    total: z.number().int(),
    page: z.number().int(),
    pageSize: z.number().int(),
  })
  .meta({ id: 'AuditList' });
export type AuditList = z.infer<typeof auditListSchema>;
