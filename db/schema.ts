/**
 * The database schema for the whole product (DESIGN.md "Domain model"). The committed
 * migrations under db/migrations are generated from this file and are the truth.
 *
 * Conventions: integer identity keys; `created_at`/`updated_at` as timestamptz; user-written
 * content keeps its current text on the row (fast reads) and every saved version in
 * `revisions` (immutable); moderation hides content with `hidden_at`/`hidden_reason`.
 */
import { sql } from 'drizzle-orm';
import {
  bigint,
  boolean,
  check,
  customType,
  date,
  index,
  integer,
  json,
  jsonb,
  pgEnum,
  pgTable,
  primaryKey,
  smallint,
  text,
  timestamp,
  uniqueIndex,
  varchar,
} from 'drizzle-orm/pg-core';
import {
  documentKinds,
  erratumStatuses,
  flagReasons,
  flagStates,
  notificationModes,
  partKinds,
  projectRoles,
  projectStatuses,
  proposalKinds,
  proposalStatuses,
  revisionSubjects,
  severities,
  siteRoles,
  tagStates,
  uploadKinds,
  uploadStates,
} from '../shared/domain';

const createdAt = () => timestamp('created_at', { withTimezone: true }).notNull().defaultNow();
const updatedAt = () => timestamp('updated_at', { withTimezone: true }).notNull().defaultNow();
const hiddenAt = () => timestamp('hidden_at', { withTimezone: true });
const hiddenReason = () => text('hidden_reason');

export const siteRole = pgEnum('site_role', siteRoles);
export const projectRole = pgEnum('project_role', projectRoles);
export const projectStatus = pgEnum('project_status', projectStatuses);
export const documentKind = pgEnum('document_kind', documentKinds);
export const revisionSubject = pgEnum('revision_subject', revisionSubjects);
export const severity = pgEnum('severity', severities);
export const erratumStatus = pgEnum('erratum_status', erratumStatuses);
export const proposalKind = pgEnum('proposal_kind', proposalKinds);
export const proposalStatus = pgEnum('proposal_status', proposalStatuses);
export const tagState = pgEnum('tag_state', tagStates);
export const partKind = pgEnum('part_kind', partKinds);
export const uploadKind = pgEnum('upload_kind', uploadKinds);
export const uploadState = pgEnum('upload_state', uploadStates);
export const flagReason = pgEnum('flag_reason', flagReasons);
export const flagState = pgEnum('flag_state', flagStates);
export const notificationMode = pgEnum('notification_mode', notificationModes);

// ---------------------------------------------------------------------------------------------
// People and sign-in

export const users = pgTable(
  'users',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    handle: text('handle').notNull(),
    displayName: text('display_name').notNull(),
    email: text('email'),
    avatarUrl: text('avatar_url'),
    role: siteRole('role').notNull().default('member'),
    suspendedAt: timestamp('suspended_at', { withTimezone: true }),
    suspendedReason: text('suspended_reason'),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [uniqueIndex('users_handle_lower_key').on(sql`lower(${t.handle})`)],
);

export const oauthIdentities = pgTable(
  'oauth_identities',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    userId: integer('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    provider: text('provider').notNull(),
    /** The provider's stable numeric account id, never the login name (logins can change). */
    providerUserId: text('provider_user_id').notNull(),
    login: text('login').notNull(),
    createdAt: createdAt(),
  },
  (t) => [
    uniqueIndex('oauth_identities_provider_key').on(t.provider, t.providerUserId),
    index('oauth_identities_user_idx').on(t.userId),
  ],
);

/** The table connect-pg-simple reads and writes (its documented layout). */
export const sessions = pgTable(
  'session',
  {
    sid: varchar('sid').primaryKey(),
    sess: json('sess').notNull(),
    expire: timestamp('expire', { precision: 6 }).notNull(),
  },
  (t) => [
    index('session_expire_idx').on(t.expire),
    index('session_user_idx').on(sql`((${t.sess} -> 'passport' ->> 'user'))`),
  ],
);

/** Counters of rate-limiter-flexible's PostgreSQL store, shared by every API process. */
export const rateLimits = pgTable('rate_limits', {
  key: varchar('key', { length: 255 }).primaryKey(),
  points: integer('points').notNull().default(0),
  expire: bigint('expire', { mode: 'number' }),
});

// ---------------------------------------------------------------------------------------------
// Projects and their write-ups

export const projects = pgTable(
  'projects',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    slug: text('slug').notNull(),
    ownerId: integer('owner_id')
      .notNull()
      .references(() => users.id),
    title: text('title').notNull(),
    summary: text('summary').notNull().default(''),
    licence: text('licence').notNull().default('unspecified'),
    licenceOther: text('licence_other'),
    repoUrl: text('repo_url'),
    status: projectStatus('status').notNull().default('draft'),
    hazards: text('hazards').array().notNull().default(sql`'{}'::text[]`),
    coverUploadId: integer('cover_upload_id'),
    /** Number of the newest metadata revision (revisions.subject = 'project'). */
    currentRevision: integer('current_revision').notNull().default(1),
    /**
     * Bumped by every change to the project or anything shown on its page (documents, board
     * revisions, members, status): readers' caches are keyed on it.
     */
    changeSeq: integer('change_seq').notNull().default(0),
    /** Erratum numbers are never reused: this counter only grows. */
    nextErratumNumber: integer('next_erratum_number').notNull().default(1),
    /** Memory budget: a firmware build warns at or above this share of flash or RAM (percent). */
    memoryWarnPercent: smallint('memory_warn_percent').notNull().default(90),
    publishedAt: timestamp('published_at', { withTimezone: true }),
    deletedAt: timestamp('deleted_at', { withTimezone: true }),
    deletedBy: integer('deleted_by').references(() => users.id),
    hiddenAt: hiddenAt(),
    hiddenReason: hiddenReason(),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [
    uniqueIndex('projects_slug_key').on(t.slug),
    index('projects_owner_idx').on(t.ownerId),
    index('projects_published_idx').on(t.status, t.updatedAt),
  ],
);

export const projectMembers = pgTable(
  'project_members',
  {
    projectId: integer('project_id')
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    userId: integer('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    role: projectRole('role').notNull(),
    addedAt: createdAt(),
  },
  (t) => [primaryKey({ columns: [t.projectId, t.userId] }), index('project_members_user_idx').on(t.userId)],
);

export const documents = pgTable(
  'documents',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    projectId: integer('project_id')
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    kind: documentKind('kind').notNull(),
    title: text('title').notNull(),
    /** Order of write-up sections; log entries are ordered by `logged_on`. */
    position: integer('position').notNull().default(0),
    loggedOn: date('logged_on'),
    body: text('body').notNull().default(''),
    currentRevision: integer('current_revision').notNull().default(1),
    createdBy: integer('created_by').references(() => users.id),
    hiddenAt: hiddenAt(),
    hiddenReason: hiddenReason(),
    deletedAt: timestamp('deleted_at', { withTimezone: true }),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [index('documents_project_idx').on(t.projectId, t.kind, t.position)],
);

/**
 * Every saved version of any user-written text. Rows are never updated: a restore or an
 * accepted proposal appends a new number. `body` holds Markdown, `fields` holds structured
 * content (erratum fields, project metadata, pin-map rows).
 */
export const revisions = pgTable(
  'revisions',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    subject: revisionSubject('subject').notNull(),
    subjectId: integer('subject_id').notNull(),
    projectId: integer('project_id').references(() => projects.id, { onDelete: 'cascade' }),
    number: integer('number').notNull(),
    parentNumber: integer('parent_number'),
    /** Null only for reference data the product ships (a part profile as loaded from db/parts). */
    authorId: integer('author_id').references(() => users.id),
    /** The contributor credited when the revision came from an accepted proposal. */
    creditedUserId: integer('credited_user_id').references(() => users.id),
    proposalId: integer('proposal_id'),
    message: text('message').notNull().default(''),
    title: text('title'),
    body: text('body'),
    fields: jsonb('fields'),
    contentHash: text('content_hash').notNull(),
    /** How the save was made: a plain edit, a line merge, a restore, an accepted proposal. */
    origin: text('origin').notNull().default('edit'),
    createdAt: createdAt(),
  },
  (t) => [
    uniqueIndex('revisions_subject_number_key').on(t.subject, t.subjectId, t.number),
    index('revisions_project_idx').on(t.projectId),
  ],
);

export const boardRevisions = pgTable(
  'board_revisions',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    projectId: integer('project_id')
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    label: text('label').notNull(),
    releasedOn: date('released_on'),
    notes: text('notes').notNull().default(''),
    position: integer('position').notNull().default(0),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('board_revisions_label_key').on(t.projectId, sql`lower(${t.label})`)],
);

// ---------------------------------------------------------------------------------------------
// Errata, lessons, tags

/** Erratum categories: a starting set seeded by the migration, extended by moderators. */
export const categories = pgTable('categories', {
  slug: text('slug').primaryKey(),
  name: text('name').notNull(),
  description: text('description').notNull().default(''),
  position: integer('position').notNull().default(0),
  createdAt: createdAt(),
});

export const errata = pgTable(
  'errata',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    projectId: integer('project_id')
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    number: integer('number').notNull(),
    title: text('title').notNull(),
    categorySlug: text('category_slug')
      .notNull()
      .references(() => categories.slug),
    severity: severity('severity').notNull(),
    status: erratumStatus('status').notNull().default('open'),
    symptom: text('symptom').notNull().default(''),
    cause: text('cause').notNull().default(''),
    workaround: text('workaround').notNull().default(''),
    fix: text('fix').notNull().default(''),
    fixedInId: integer('fixed_in_id').references(() => boardRevisions.id, { onDelete: 'set null' }),
    /** Ids of the board revisions the defect affects (removed boards are taken out of it). */
    affected: integer('affected').array().notNull().default(sql`'{}'::integer[]`),
    /** Where the defect sits: reference designators, part names, pin labels. */
    refdes: text('refdes').array().notNull().default(sql`'{}'::text[]`),
    parts: text('parts').array().notNull().default(sql`'{}'::text[]`),
    pins: text('pins').array().notNull().default(sql`'{}'::text[]`),
    reportedById: integer('reported_by_id').references(() => users.id),
    reportedByText: text('reported_by_text'),
    currentRevision: integer('current_revision').notNull().default(1),
    createdBy: integer('created_by').references(() => users.id),
    hiddenAt: hiddenAt(),
    hiddenReason: hiddenReason(),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [
    uniqueIndex('errata_project_number_key').on(t.projectId, t.number),
    index('errata_affected_idx').using('gin', t.affected),
  ],
);

export const lessons = pgTable(
  'lessons',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    projectId: integer('project_id')
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    body: text('body').notNull(),
    position: integer('position').notNull().default(0),
    currentRevision: integer('current_revision').notNull().default(1),
    createdBy: integer('created_by').references(() => users.id),
    hiddenAt: hiddenAt(),
    hiddenReason: hiddenReason(),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [index('lessons_project_idx').on(t.projectId)],
);

export const lessonErrata = pgTable(
  'lesson_errata',
  {
    lessonId: integer('lesson_id')
      .notNull()
      .references(() => lessons.id, { onDelete: 'cascade' }),
    erratumId: integer('erratum_id')
      .notNull()
      .references(() => errata.id, { onDelete: 'cascade' }),
  },
  (t) => [primaryKey({ columns: [t.lessonId, t.erratumId] })],
);

export const tags = pgTable(
  'tags',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    slug: text('slug').notNull(),
    name: text('name').notNull(),
    description: text('description').notNull().default(''),
    state: tagState('state').notNull().default('pending'),
    mergedIntoId: integer('merged_into_id'),
    createdBy: integer('created_by').references(() => users.id),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [uniqueIndex('tags_slug_key').on(t.slug)],
);

export const tagAliases = pgTable('tag_aliases', {
  alias: text('alias').primaryKey(),
  tagId: integer('tag_id')
    .notNull()
    .references(() => tags.id, { onDelete: 'cascade' }),
  createdAt: createdAt(),
});

const tagLink = (name: string, column: string, target: typeof lessons | typeof errata | typeof projects) =>
  pgTable(
    name,
    {
      subjectId: integer(column)
        .notNull()
        .references(() => target.id, { onDelete: 'cascade' }),
      tagId: integer('tag_id')
        .notNull()
        .references(() => tags.id, { onDelete: 'cascade' }),
      /** The tag first applied, kept so an unmerge can put content back as it was. */
      originalTagId: integer('original_tag_id').references(() => tags.id, { onDelete: 'set null' }),
      createdAt: createdAt(),
    },
    (t) => [primaryKey({ columns: [t.subjectId, t.tagId] }), index(`${name}_tag_idx`).on(t.tagId)],
  );

export const lessonTags = tagLink('lesson_tags', 'lesson_id', lessons);
export const erratumTags = tagLink('erratum_tags', 'erratum_id', errata);
export const projectTags = tagLink('project_tags', 'project_id', projects);

// ---------------------------------------------------------------------------------------------
// Contributions

export const proposals = pgTable(
  'proposals',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    projectId: integer('project_id')
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    kind: proposalKind('kind').notNull(),
    erratumId: integer('erratum_id').references(() => errata.id, { onDelete: 'cascade' }),
    documentId: integer('document_id').references(() => documents.id, { onDelete: 'cascade' }),
    /** The revision of the target the proposal was written against (null for a new erratum). */
    baseRevision: integer('base_revision'),
    authorId: integer('author_id')
      .notNull()
      .references(() => users.id),
    status: proposalStatus('status').notNull().default('open'),
    message: text('message').notNull().default(''),
    payload: jsonb('payload').notNull(),
    decidedBy: integer('decided_by').references(() => users.id),
    decidedAt: timestamp('decided_at', { withTimezone: true }),
    decisionReason: text('decision_reason'),
    resultRevisionId: integer('result_revision_id').references(() => revisions.id),
    hiddenAt: hiddenAt(),
    hiddenReason: hiddenReason(),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [
    index('proposals_project_status_idx').on(t.projectId, t.status),
    index('proposals_author_idx').on(t.authorId),
    check(
      'proposals_target_check',
      // A new erratum has no target until accepted; then erratum_id points at what it became.
      sql`(${t.kind} = 'new_erratum' AND ${t.documentId} IS NULL)
        OR (${t.kind} = 'erratum_edit' AND ${t.erratumId} IS NOT NULL)
        OR (${t.kind} = 'document_edit' AND ${t.documentId} IS NOT NULL)`,
    ),
  ],
);

export const comments = pgTable(
  'comments',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    projectId: integer('project_id')
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    proposalId: integer('proposal_id').references(() => proposals.id, { onDelete: 'cascade' }),
    erratumId: integer('erratum_id').references(() => errata.id, { onDelete: 'cascade' }),
    authorId: integer('author_id')
      .notNull()
      .references(() => users.id),
    body: text('body').notNull(),
    hiddenAt: hiddenAt(),
    hiddenReason: hiddenReason(),
    createdAt: createdAt(),
    editedAt: timestamp('edited_at', { withTimezone: true }),
  },
  (t) => [
    index('comments_proposal_idx').on(t.proposalId),
    index('comments_erratum_idx').on(t.erratumId),
    check('comments_target_check', sql`(${t.proposalId} IS NULL) <> (${t.erratumId} IS NULL)`),
  ],
);

// ---------------------------------------------------------------------------------------------
// Parts and checks

export const parts = pgTable(
  'parts',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    slug: text('slug').notNull(),
    name: text('name').notNull(),
    kind: partKind('kind').notNull(),
    aliases: text('aliases').array().notNull().default(sql`'{}'::text[]`),
    /** Supply range, thresholds, capacities and the pin profile, each value with its source. */
    profile: jsonb('profile').notNull(),
    currentRevision: integer('current_revision').notNull().default(1),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [uniqueIndex('parts_slug_key').on(t.slug)],
);

export const pinMaps = pgTable(
  'pin_maps',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    projectId: integer('project_id')
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    boardRevisionId: integer('board_revision_id')
      .notNull()
      .references(() => boardRevisions.id, { onDelete: 'cascade' }),
    partId: integer('part_id')
      .notNull()
      .references(() => parts.id),
    supplyVolts: text('supply_volts'),
    rows: jsonb('rows').notNull().default(sql`'[]'::jsonb`),
    currentRevision: integer('current_revision').notNull().default(1),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [uniqueIndex('pin_maps_board_part_key').on(t.projectId, t.boardRevisionId, t.partId)],
);

export const firmwareBuilds = pgTable(
  'firmware_builds',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    projectId: integer('project_id')
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    partId: integer('part_id').references(() => parts.id),
    label: text('label').notNull(),
    builtOn: date('built_on'),
    changeNote: text('change_note').notNull().default(''),
    reportFormat: text('report_format').notNull(),
    reportText: text('report_text').notNull(),
    sections: jsonb('sections').notNull(),
    flashUsed: integer('flash_used').notNull(),
    ramUsed: integer('ram_used').notNull(),
    bootloaderBytes: integer('bootloader_bytes').notNull().default(0),
    createdBy: integer('created_by').references(() => users.id),
    createdAt: createdAt(),
  },
  (t) => [index('firmware_builds_project_idx').on(t.projectId, t.createdAt)],
);

// ---------------------------------------------------------------------------------------------
// Files

export const uploads = pgTable(
  'uploads',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    sha256: text('sha256').notNull(),
    ownerId: integer('owner_id')
      .notNull()
      .references(() => users.id),
    projectId: integer('project_id').references(() => projects.id, { onDelete: 'cascade' }),
    kind: uploadKind('kind').notNull(),
    state: uploadState('state').notNull().default('processing'),
    mime: text('mime').notNull(),
    bytes: bigint('bytes', { mode: 'number' }).notNull(),
    width: integer('width'),
    height: integer('height'),
    originalName: text('original_name').notNull(),
    altText: text('alt_text').notNull().default(''),
    caption: text('caption').notNull().default(''),
    /** Key of the original in the storage port (content-addressed: derived from sha256). */
    storageKey: text('storage_key').notNull(),
    variants: jsonb('variants').notNull().default(sql`'[]'::jsonb`),
    /** What processing found: frames of an animation, ZIP entries, why it failed. */
    details: jsonb('details').notNull().default(sql`'{}'::jsonb`),
    /** When nothing references it any more; removed after a grace period unless referenced again. */
    unreferencedSince: timestamp('unreferenced_since', { withTimezone: true }),
    hiddenAt: hiddenAt(),
    hiddenReason: hiddenReason(),
    createdAt: createdAt(),
  },
  (t) => [
    index('uploads_project_idx').on(t.projectId),
    index('uploads_sha256_idx').on(t.sha256),
    index('uploads_owner_idx').on(t.ownerId),
  ],
);

/**
 * Which content uses which upload (images in Markdown, the cover photo). Kept in step by every
 * save; an upload with no reference left is swept after a grace period.
 */
export const uploadRefs = pgTable(
  'upload_refs',
  {
    uploadId: integer('upload_id')
      .notNull()
      .references(() => uploads.id, { onDelete: 'cascade' }),
    /** 'document' | 'erratum' | 'lesson' | 'comment' | 'proposal' | 'project_cover' | 'board_revision' */
    subject: text('subject').notNull(),
    subjectId: integer('subject_id').notNull(),
  },
  (t) => [primaryKey({ columns: [t.uploadId, t.subject, t.subjectId] }), index('upload_refs_subject_idx').on(t.subject, t.subjectId)],
);

// ---------------------------------------------------------------------------------------------
// Moderation

export const flags = pgTable(
  'flags',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    targetKind: text('target_kind').notNull(),
    targetId: integer('target_id').notNull(),
    projectId: integer('project_id').references(() => projects.id, { onDelete: 'cascade' }),
    authorId: integer('author_id')
      .notNull()
      .references(() => users.id),
    reason: flagReason('reason').notNull(),
    text: text('text').notNull().default(''),
    state: flagState('state').notNull().default('open'),
    handledBy: integer('handled_by').references(() => users.id),
    handledAt: timestamp('handled_at', { withTimezone: true }),
    createdAt: createdAt(),
  },
  (t) => [
    // A member's repeated flags on the same target count once.
    uniqueIndex('flags_open_author_target_key')
      .on(t.targetKind, t.targetId, t.authorId)
      .where(sql`${t.state} = 'open'`),
    index('flags_state_idx').on(t.state, t.createdAt),
  ],
);

/** Append-only: a trigger in the migration refuses UPDATE and DELETE. */
export const auditLog = pgTable(
  'audit_log',
  {
    id: bigint('id', { mode: 'number' }).primaryKey().generatedAlwaysAsIdentity(),
    actorId: integer('actor_id').references(() => users.id),
    action: text('action').notNull(),
    targetKind: text('target_kind').notNull(),
    targetId: text('target_id').notNull(),
    projectId: integer('project_id'),
    before: jsonb('before'),
    after: jsonb('after'),
    reason: text('reason').notNull().default(''),
    at: timestamp('at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('audit_log_target_idx').on(t.targetKind, t.targetId), index('audit_log_at_idx').on(t.at)],
);

// ---------------------------------------------------------------------------------------------
// Notifications

export const follows = pgTable(
  'follows',
  {
    userId: integer('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    projectId: integer('project_id')
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    createdAt: createdAt(),
  },
  (t) => [primaryKey({ columns: [t.userId, t.projectId] })],
);

export const notifications = pgTable(
  'notifications',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    userId: integer('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    kind: text('kind').notNull(),
    payload: jsonb('payload').notNull(),
    readAt: timestamp('read_at', { withTimezone: true }),
    emailed: boolean('emailed').notNull().default(false),
    createdAt: createdAt(),
  },
  (t) => [index('notifications_user_idx').on(t.userId, t.readAt, t.createdAt)],
);

export const notificationSettings = pgTable(
  'notification_settings',
  {
    userId: integer('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    kind: text('kind').notNull(),
    mode: notificationMode('mode').notNull(),
  },
  (t) => [primaryKey({ columns: [t.userId, t.kind] })],
);

// ---------------------------------------------------------------------------------------------
// Search (PostgreSQL full-text, the embedded default; see api/search)

const tsvector = customType<{ data: string }>({ dataType: () => 'tsvector' });

/**
 * One row per searchable item, rebuilt by the indexer from the outbox. `visible` is whether
 * anyone may read it (published, not hidden, not deleted); members of a project also see its
 * drafts, which the query decides from `project_id`.
 */
export const searchDocs = pgTable(
  'search_docs',
  {
    id: bigint('id', { mode: 'number' }).primaryKey().generatedAlwaysAsIdentity(),
    kind: text('kind').notNull(),
    refId: integer('ref_id').notNull(),
    projectId: integer('project_id'),
    visible: boolean('visible').notNull(),
    title: text('title').notNull(),
    /** Plain text the snippet is cut from. */
    body: text('body').notNull().default(''),
    url: text('url').notNull(),
    projectSlug: text('project_slug'),
    projectTitle: text('project_title'),
    category: text('category'),
    severity: text('severity'),
    status: text('status'),
    tags: text('tags').array().notNull().default(sql`'{}'::text[]`),
    parts: text('parts').array().notNull().default(sql`'{}'::text[]`),
    pins: text('pins').array().notNull().default(sql`'{}'::text[]`),
    tsv: tsvector('tsv').notNull(),
    /** Titles, part numbers and pin labels alone: a second, small candidate set (see api/search). */
    titleTsv: tsvector('title_tsv').notNull(),
    updatedAt: timestamp('updated_at', { withTimezone: true }).notNull(),
  },
  (t) => [
    uniqueIndex('search_docs_ref_key').on(t.kind, t.refId),
    index('search_docs_tsv_idx').using('gin', t.tsv),
    index('search_docs_title_tsv_idx').using('gin', t.titleTsv),
    index('search_docs_updated_idx').on(t.updatedAt),
    index('search_docs_project_idx').on(t.projectId),
  ],
);

/** Items whose search rows must be rebuilt; filled by triggers on the source tables. */
export const searchOutbox = pgTable('search_outbox', {
  id: bigint('id', { mode: 'number' }).primaryKey().generatedAlwaysAsIdentity(),
  kind: text('kind').notNull(),
  refId: integer('ref_id').notNull(),
  queuedAt: timestamp('queued_at', { withTimezone: true }).notNull().defaultNow(),
});

/** Words and codes seen in titles, parts, pins and tags: the vocabulary of "did you mean". */
export const searchTerms = pgTable('search_terms', {
  term: text('term').primaryKey(),
  docs: integer('docs').notNull().default(0),
});
