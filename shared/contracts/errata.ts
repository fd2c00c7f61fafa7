/**
 * Contracts of errata, lessons, tags, proposals, comments, follows and notifications.
 */
import { z } from 'zod';
import { erratumStatuses, notificationModes, proposalKinds, proposalStatuses, severities, tagStates } from '../domain';
import { line, prose, slugSchema } from '../text';
import { documentContentSchema, revisionNumberSchema, slugParamsSchema, viewerPermissionsSchema } from './projects';
import { hiddenInfoSchema } from './moderation';
import { userSummarySchema } from './users';

export const MAX_ERRATUM_TEXT = 20_000;

// ---------------------------------------------------------------------------------------------
// Errata

const shortList = (max: number, itemMax: number, label: string) =>
  z
    .array(line({ max: itemMax, label }))
    .max(max, `at most ${max} entries`)
    .transform((list) => [...new Set(list.filter((v) => v.length > 0))]);

/** The editable fields of an erratum: what a maker writes and a contributor may propose. */
export const erratumFieldsSchema = z
  .strictObject({
    title: line({ max: 160, label: 'Title' }),
    category: slugSchema,
    severity: z.enum(severities),
    status: z.enum(erratumStatuses),
    /** Ids of the project's board revisions this defect affects. */
    affected: z
      .array(z.number().int().min(1))
      .max(50)
      .transform((ids) => [...new Set(ids)].sort((a, b) => a - b)),
    /** The board revision that fixes it, if any. */
    fixedIn: z.number().int().min(1).nullable().default(null),
    /** Reference designators such as U3, J2. */
    refdes: shortList(50, 20, 'Reference designator').default([]),
    /** Part names such as ATmega328P, AMS1117. */
    parts: shortList(20, 80, 'Part').default([]),
    /** Pin labels such as A6, GPIO35, PD2. */
    pins: shortList(50, 40, 'Pin').default([]),
    symptom: prose({ max: MAX_ERRATUM_TEXT, label: 'Symptom' }).default(''),
    cause: prose({ max: MAX_ERRATUM_TEXT, label: 'Cause' }).default(''),
    workaround: prose({ max: MAX_ERRATUM_TEXT, label: 'Workaround' }).default(''),
    fix: prose({ max: MAX_ERRATUM_TEXT, label: 'Fix' }).default(''),
    /** Credit for someone without an account (free text); members are credited by account. */
    reportedByText: line({ min: 0, max: 120, label: 'Reported by' }).default(''),
  })
  .meta({ id: 'ErratumFields' });
export type ErratumFields = z.output<typeof erratumFieldsSchema>;
export type ErratumFieldsInput = z.input<typeof erratumFieldsSchema>;

export const createErratumSchema = erratumFieldsSchema
  .extend({
    tags: z.array(z.string().trim().min(1).max(60)).max(12).default([]),
    message: line({ min: 0, max: 200, label: 'Message' }).default(''),
  })
  .meta({ id: 'CreateErratum' });
export type CreateErratum = z.input<typeof createErratumSchema>;

export const saveErratumSchema = createErratumSchema
  .extend({ baseRevision: revisionNumberSchema.optional() })
  .meta({ id: 'SaveErratum' });
export type SaveErratum = z.input<typeof saveErratumSchema>;

/** `E3` or `3`: erratum numbers are per project and never reused. */
export const erratumNumberSchema = z
  .string()
  .regex(/^[Ee]?\d{1,6}$/, 'an erratum number such as E3')
  .transform((v) => Number(v.replace(/^[Ee]/, '')));

export const erratumParamsSchema = slugParamsSchema.extend({ number: erratumNumberSchema });
export const erratumRevisionParamsSchema = erratumParamsSchema.extend({ revision: z.coerce.number().int().min(1) });

export const tagRefSchema = z
  .object({ slug: z.string(), name: z.string(), state: z.enum(tagStates) })
  .meta({ id: 'TagRef' });
export type TagRef = z.infer<typeof tagRefSchema>;

export const boardRefSchema = z.object({ id: z.number().int(), label: z.string() });

export const erratumSchema = z
  .object({
    id: z.number().int(),
    number: z.number().int(),
    /** "E3" */
    code: z.string(),
    title: z.string(),
    category: z.object({ slug: z.string(), name: z.string() }),
    severity: z.enum(severities),
    status: z.enum(erratumStatuses),
    affected: z.array(boardRefSchema),
    fixedIn: boardRefSchema.nullable(),
    refdes: z.array(z.string()),
    parts: z.array(z.string()),
    pins: z.array(z.string()),
    symptom: z.string(),
    cause: z.string(),
    workaround: z.string(),
    fix: z.string(),
    html: z.object({ symptom: z.string(), cause: z.string(), workaround: z.string(), fix: z.string() }),
    reportedBy: userSummarySchema.nullable(),
    reportedByText: z.string(),
    tags: z.array(tagRefSchema),
    revision: z.number().int(),
    commentCount: z.number().int(),
    createdAt: z.string(),
    updatedAt: z.string(),
    /** Set when moderators hid it; only people who may still see it receive it (moderation.ts). */
    hidden: hiddenInfoSchema.nullable().optional(),
  })
  .meta({ id: 'Erratum' });
export type Erratum = z.infer<typeof erratumSchema>;

export const erratumListSchema = z
  .object({
    items: z.array(erratumSchema),
    boards: z.array(boardRefSchema),
    categories: z.array(z.object({ slug: z.string(), name: z.string() })),
    viewer: viewerPermissionsSchema.extend({ canPropose: z.boolean() }),
  })
  .meta({ id: 'ErratumList' });
export type ErratumList = z.infer<typeof erratumListSchema>;

export const erratumDetailSchema = erratumSchema
  .extend({
    projectSlug: z.string(),
    projectTitle: z.string(),
    boards: z.array(boardRefSchema),
    lessons: z.array(z.object({ id: z.number().int(), html: z.string() })),
    viewer: viewerPermissionsSchema.extend({ canPropose: z.boolean() }),
  })
  .meta({ id: 'ErratumDetail' });
export type ErratumDetail = z.infer<typeof erratumDetailSchema>;

export const erratumSaveResultSchema = z
  .object({
    outcome: z.enum(['saved', 'merged', 'unchanged']),
    mergedWith: z.object({ base: z.number().int(), theirs: z.number().int() }).nullable(),
    erratum: erratumDetailSchema,
  })
  .meta({ id: 'ErratumSaveResult' });
export type ErratumSaveResult = z.infer<typeof erratumSaveResultSchema>;

export const categoryListSchema = z
  .object({ items: z.array(z.object({ slug: z.string(), name: z.string(), description: z.string() })) })
  .meta({ id: 'CategoryList' });

// ---------------------------------------------------------------------------------------------
// Lessons and tags

export const lessonInputSchema = z
  .strictObject({
    body: prose({ min: 1, max: 4000, label: 'Lesson' }),
    /** Tag names or slugs; unknown ones are created as pending tags. */
    tags: z.array(z.string().trim().min(1).max(60)).max(12).default([]),
    /** Numbers of this project's errata the lesson comes from. */
    errata: z
      .array(z.number().int().min(1))
      .max(30)
      .default([])
      .transform((ids) => [...new Set(ids)].sort((a, b) => a - b)),
  })
  .meta({ id: 'LessonInput' });
export type LessonInput = z.input<typeof lessonInputSchema>;

export const saveLessonSchema = lessonInputSchema
  .extend({ baseRevision: revisionNumberSchema.optional(), message: line({ min: 0, max: 200 }).default('') })
  .meta({ id: 'SaveLesson' });

export const lessonParamsSchema = slugParamsSchema.extend({ lessonId: z.coerce.number().int().min(1) });

export const lessonSchema = z
  .object({
    id: z.number().int(),
    body: z.string(),
    html: z.string(),
    tags: z.array(tagRefSchema),
    errata: z.array(z.object({ number: z.number().int(), code: z.string(), title: z.string() })),
    revision: z.number().int(),
    createdAt: z.string(),
    updatedAt: z.string(),
    hidden: hiddenInfoSchema.nullable().optional(),
  })
  .meta({ id: 'Lesson' });
export type Lesson = z.infer<typeof lessonSchema>;

export const lessonListSchema = z
  .object({ items: z.array(lessonSchema), viewer: viewerPermissionsSchema })
  .meta({ id: 'LessonList' });
export type LessonList = z.infer<typeof lessonListSchema>;

export const tagSuggestQuerySchema = z.strictObject({ q: z.string().trim().max(60).default('') });
export const tagSuggestionsSchema = z.object({ items: z.array(tagRefSchema) }).meta({ id: 'TagSuggestions' });

// ---------------------------------------------------------------------------------------------
// Proposals

export const proposalInputSchema = z
  .discriminatedUnion('kind', [
    z.strictObject({
      kind: z.literal('new_erratum'),
      payload: erratumFieldsSchema,
      message: line({ min: 0, max: 300, label: 'Message' }).default(''),
    }),
    z.strictObject({
      kind: z.literal('erratum_edit'),
      erratumNumber: z.number().int().min(1),
      baseRevision: revisionNumberSchema,
      payload: erratumFieldsSchema,
      message: line({ min: 0, max: 300, label: 'Message' }).default(''),
    }),
    z.strictObject({
      kind: z.literal('document_edit'),
      documentId: z.number().int().min(1),
      baseRevision: revisionNumberSchema,
      payload: documentContentSchema,
      message: line({ min: 0, max: 300, label: 'Message' }).default(''),
    }),
  ])
  .meta({ id: 'ProposalInput' });
export type ProposalInput = z.input<typeof proposalInputSchema>;

export const proposalParamsSchema = z.strictObject({ proposalId: z.coerce.number().int().min(1) });

export const proposalTargetSchema = z.object({
  kind: z.enum(proposalKinds),
  /** For erratum edits and new errata once accepted: the erratum number. */
  erratumNumber: z.number().int().nullable(),
  documentId: z.number().int().nullable(),
  /** What the reader sees as the target: "E3 Relay never switches", "Hardware". */
  label: z.string(),
});

export const proposalSummarySchema = z
  .object({
    id: z.number().int(),
    projectSlug: z.string(),
    projectTitle: z.string(),
    kind: z.enum(proposalKinds),
    target: proposalTargetSchema,
    status: z.enum(proposalStatuses),
    author: userSummarySchema,
    message: z.string(),
    decidedBy: userSummarySchema.nullable(),
    decidedAt: z.string().nullable(),
    decisionReason: z.string().nullable(),
    commentCount: z.number().int(),
    createdAt: z.string(),
    hidden: hiddenInfoSchema.nullable().optional(),
  })
  .meta({ id: 'ProposalSummary' });
export type ProposalSummary = z.infer<typeof proposalSummarySchema>;

export const proposalListSchema = z.object({ items: z.array(proposalSummarySchema) }).meta({ id: 'ProposalList' });
export type ProposalList = z.infer<typeof proposalListSchema>;

export const proposalListQuerySchema = z.strictObject({ status: z.enum(proposalStatuses).optional() });

/**
 * A proposal with what a reviewer needs: the content it was written against (`base`), what it
 * proposes (`proposed`), what is stored now (`current`), and `forward`: the proposal merged onto
 * the current content when the target moved on since (`clean: false` lists the overlaps).
 * Fields are erratum fields or `{ title, body, loggedOn }` for documents.
 */
export const proposalDetailSchema = proposalSummarySchema
  .extend({
    baseRevision: z.number().int().nullable(),
    currentRevision: z.number().int().nullable(),
    base: z.record(z.string(), z.unknown()).nullable(),
    proposed: z.record(z.string(), z.unknown()),
    current: z.record(z.string(), z.unknown()).nullable(),
    forward: z.object({
      clean: z.boolean(),
      fields: z.record(z.string(), z.unknown()),
      conflicts: z.array(z.object({ field: z.string(), base: z.unknown(), ours: z.unknown(), theirs: z.unknown() })),
    }),
    /** Board revisions of the project, to show affected/fixed-in ids as labels. */
    boards: z.array(boardRefSchema),
    viewer: z.object({ canReview: z.boolean(), canWithdraw: z.boolean(), canComment: z.boolean() }),
  })
  .meta({ id: 'ProposalDetail' });
export type ProposalDetail = z.infer<typeof proposalDetailSchema>;

/** Accept as is (no `payload`) or after editing (`payload` replaces the proposed fields). */
export const acceptProposalSchema = z
  .strictObject({
    /** The revision of the target the reviewer looked at (omit for a new erratum). */
    baseRevision: revisionNumberSchema.optional(),
    payload: z.union([erratumFieldsSchema, documentContentSchema]).optional(),
    message: line({ min: 0, max: 200 }).default(''),
  })
  .meta({ id: 'AcceptProposal' });
export type AcceptProposal = z.input<typeof acceptProposalSchema>;

export const declineProposalSchema = z
  .strictObject({ reason: line({ min: 1, max: 500, label: 'Reason' }) })
  .meta({ id: 'DeclineProposal' });

export const proposalDecisionSchema = z
  .object({
    proposal: proposalDetailSchema,
    /** Where the accepted content now lives. */
    result: z
      .object({ erratumNumber: z.number().int().nullable(), documentId: z.number().int().nullable(), revision: z.number().int() })
      .nullable(),
  })
  .meta({ id: 'ProposalDecision' });
export type ProposalDecision = z.infer<typeof proposalDecisionSchema>;

// ---------------------------------------------------------------------------------------------
// Comments

export const commentInputSchema = z
  .strictObject({ body: prose({ min: 1, max: 10_000, label: 'Comment' }) })
  .meta({ id: 'CommentInput' });

export const commentSchema = z
  .object({
    id: z.number().int(),
    author: userSummarySchema,
    /** Empty for a hidden comment, except to its author and the moderators. */
    body: z.string(),
    html: z.string(),
    createdAt: z.string(),
    hidden: hiddenInfoSchema.nullable().optional(),
  })
  .meta({ id: 'Comment' });
export type Comment = z.infer<typeof commentSchema>;

export const commentListSchema = z.object({ items: z.array(commentSchema), canComment: z.boolean() }).meta({ id: 'CommentList' });
export type CommentList = z.infer<typeof commentListSchema>;

// ---------------------------------------------------------------------------------------------
// Follows and notifications

export const notificationKinds = ['proposal_received', 'proposal_decided', 'comment', 'new_erratum'] as const;
export type NotificationKind = (typeof notificationKinds)[number];
export const notificationKindLabels: Record<NotificationKind, string> = {
  proposal_received: 'A proposal arrives on a project you own or edit',
  proposal_decided: 'Your proposal is accepted or declined',
  comment: 'Someone comments in a discussion you are part of',
  new_erratum: 'A new erratum appears on a project you follow',
};
/** Default delivery per kind when a member has chosen nothing. */
export const defaultNotificationModes: Record<NotificationKind, (typeof notificationModes)[number]> = {
  proposal_received: 'immediate',
  proposal_decided: 'immediate',
  comment: 'immediate',
  new_erratum: 'daily',
};

/** What a notification carries: enough to show it and to write its e-mail without a lookup. */
export const notificationPayloadSchema = z.object({
  projectSlug: z.string(),
  projectTitle: z.string(),
  actor: userSummarySchema.pick({ handle: true, displayName: true }),
  proposalId: z.number().int().optional(),
  proposalKind: z.enum(proposalKinds).optional(),
  targetLabel: z.string().optional(),
  decision: z.enum(['accepted', 'declined']).optional(),
  reason: z.string().optional(),
  erratumNumber: z.number().int().optional(),
  erratumTitle: z.string().optional(),
  /** The first few hundred characters of a comment, as plain text. */
  excerpt: z.string().optional(),
  /** App-relative path of what the notification is about. */
  path: z.string(),
});
export type NotificationPayload = z.infer<typeof notificationPayloadSchema>;

export const notificationSchema = z
  .object({
    id: z.number().int(),
    kind: z.enum(notificationKinds),
    payload: notificationPayloadSchema,
    read: z.boolean(),
    createdAt: z.string(),
  })
  .meta({ id: 'Notification' });
export type Notification = z.infer<typeof notificationSchema>;

export const notificationListSchema = z
  .object({ items: z.array(notificationSchema), unreadCount: z.number().int() })
  .meta({ id: 'NotificationList' });
export type NotificationList = z.infer<typeof notificationListSchema>;

export const markReadSchema = z
  .strictObject({ ids: z.array(z.number().int().min(1)).max(200).optional(), all: z.boolean().optional() })
  .meta({ id: 'MarkRead' });

export const notificationSettingsSchema = z
  .object({ modes: z.record(z.enum(notificationKinds), z.enum(notificationModes)) })
  .meta({ id: 'NotificationSettings' });
export type NotificationSettings = z.infer<typeof notificationSettingsSchema>;

export const updateNotificationSettingsSchema = z
  .strictObject({ modes: z.partialRecord(z.enum(notificationKinds), z.enum(notificationModes)) })
  .meta({ id: 'UpdateNotificationSettings' });

export const followStateSchema = z.object({ following: z.boolean() }).meta({ id: 'FollowState' });
