/**
 * Contracts of projects, their write-up documents (sections and log entries), board
 * revisions and revision history. The client forms and the server parse with these.
 */
import { z } from 'zod';
import { hazards, projectRoles, projectStatuses } from '../domain';
import { line, prose, slugSchema } from '../text';
import { hiddenInfoSchema } from './moderation';
import { userSummarySchema } from './users';

/** Common open hardware and software licences (SPDX identifiers), plus "other". */
export const licences = [
  { id: 'CERN-OHL-S-2.0', name: 'CERN Open Hardware Licence v2 — Strongly Reciprocal', kind: 'hardware' },
  { id: 'CERN-OHL-W-2.0', name: 'CERN Open Hardware Licence v2 — Weakly Reciprocal', kind: 'hardware' },
  { id: 'CERN-OHL-P-2.0', name: 'CERN Open Hardware Licence v2 — Permissive', kind: 'hardware' },
  { id: 'TAPR-OHL-1.0', name: 'TAPR Open Hardware License v1.0', kind: 'hardware' },
  { id: 'SHL-0.51', name: 'Solderpad Hardware License v0.51', kind: 'hardware' },
  { id: 'CC-BY-4.0', name: 'Creative Commons Attribution 4.0', kind: 'documentation' },
  { id: 'CC-BY-SA-4.0', name: 'Creative Commons Attribution-ShareAlike 4.0', kind: 'documentation' },
  { id: 'CC0-1.0', name: 'Creative Commons Zero v1.0 (public domain dedication)', kind: 'documentation' },
  { id: 'MIT', name: 'MIT License', kind: 'software' },
  { id: 'Apache-2.0', name: 'Apache License 2.0', kind: 'software' },
  { id: 'BSD-3-Clause', name: 'BSD 3-Clause License', kind: 'software' },
  { id: 'GPL-3.0-or-later', name: 'GNU General Public License v3.0 or later', kind: 'software' },
  { id: 'LGPL-3.0-or-later', name: 'GNU Lesser General Public License v3.0 or later', kind: 'software' },
  { id: 'MPL-2.0', name: 'Mozilla Public License 2.0', kind: 'software' },
  { id: 'other', name: 'Other (describe it)', kind: 'other' },
  { id: 'unspecified', name: 'Not chosen yet', kind: 'other' },
] as const;
export type LicenceId = (typeof licences)[number]['id'];
export const licenceIds = licences.map((l) => l.id) as [LicenceId, ...LicenceId[]];

const httpUrl = z
  .string()
  .trim()
  .max(500, 'at most 500 characters')
  .refine((v) => {
    try {
      const u = new URL(v);
      return u.protocol === 'https:' || u.protocol === 'http:';
    } catch {
      return false;
    }
  }, 'an http(s) address such as https://example.org/repo');

/** A revision number a save was based on. */
export const revisionNumberSchema = z.coerce.number().int().min(1).max(1_000_000_000);

// ---------------------------------------------------------------------------------------------
// Projects

export const projectMetaFieldsSchema = z.strictObject({
  title: line({ max: 120, label: 'Title' }),
  summary: line({ min: 0, max: 300, label: 'Summary' }),
  licence: z.enum(licenceIds),
  licenceOther: line({ min: 0, max: 200, label: 'Licence description' }).default(''),
  repoUrl: z.union([httpUrl, z.literal('')]).default(''),
  hazards: z
    .array(z.enum(hazards))
    .max(hazards.length)
    .transform((list) => [...new Set(list)].sort()),
});
export type ProjectMetaFields = z.infer<typeof projectMetaFieldsSchema>;

export const createProjectSchema = projectMetaFieldsSchema
  .extend({ slug: slugSchema.optional() })
  .refine((p) => p.licence !== 'other' || p.licenceOther.length > 0, {
    path: ['licenceOther'],
    message: 'Describe the licence when choosing "Other"',
  })
  .meta({ id: 'CreateProject' });
export type CreateProject = z.input<typeof createProjectSchema>;

export const updateProjectSchema = projectMetaFieldsSchema
  .extend({ baseRevision: revisionNumberSchema.optional(), message: line({ min: 0, max: 200, label: 'Message' }).default('') })
  .meta({ id: 'UpdateProject' });
export type UpdateProject = z.input<typeof updateProjectSchema>;

export const slugParamsSchema = z.strictObject({ slug: slugSchema });

export const memberSchema = userSummarySchema.extend({ role: z.enum(projectRoles) }).meta({ id: 'ProjectMember' });
export type ProjectMember = z.infer<typeof memberSchema>;

export const boardRevisionSchema = z
  .object({
    id: z.number().int(),
    label: z.string(),
    releasedOn: z.string().nullable(),
    notes: z.string(),
    notesHtml: z.string(),
    position: z.number().int(),
  })
  .meta({ id: 'BoardRevision' });
export type BoardRevision = z.infer<typeof boardRevisionSchema>;

const isoDate = z.iso.date('a date such as 2026-03-14');

export const boardRevisionInputSchema = z
  .strictObject({
    label: line({ max: 40, label: 'Label' }),
    releasedOn: isoDate.nullable().default(null),
    notes: prose({ max: 5000, label: 'Notes' }).default(''),
  })
  .meta({ id: 'BoardRevisionInput' });
export type BoardRevisionInput = z.input<typeof boardRevisionInputSchema>;

export const boardRevisionParamsSchema = z.strictObject({ slug: slugSchema, boardId: z.coerce.number().int().min(1) });

/** The cover photo, ready for an `<img>` (a photo of the project chosen in its gallery). */
export const projectCoverSchema = z
  .object({
    /** The page-width WebP variant. */
    url: z.string(),
    srcset: z.string(),
    sizes: z.string(),
    width: z.number().int(),
    height: z.number().int(),
    altText: z.string(),
  })
  .meta({ id: 'ProjectCover' });
export type ProjectCover = z.infer<typeof projectCoverSchema>;

export const projectCardSchema = z
  .object({
    slug: z.string(),
    title: z.string(),
    summary: z.string(),
    status: z.enum(projectStatuses),
    hazards: z.array(z.enum(hazards)),
    owner: userSummarySchema,
    updatedAt: z.string(),
    publishedAt: z.string().nullable(),
    /** The viewer's role on the project, when they have one. */
    myRole: z.enum(projectRoles).nullable(),
    cover: projectCoverSchema.nullable(),
  })
  .meta({ id: 'ProjectCard' });
export type ProjectCard = z.infer<typeof projectCardSchema>;

export const projectListSchema = z
  .object({ items: z.array(projectCardSchema), total: z.number().int(), page: z.number().int(), pageSize: z.number().int() })
  .meta({ id: 'ProjectList' });
export type ProjectList = z.infer<typeof projectListSchema>;

export const projectListQuerySchema = z.strictObject({ page: z.coerce.number().int().min(1).max(10_000).default(1) });

export const tocEntrySchema = z.object({ level: z.number().int(), id: z.string(), text: z.string() });
export type TocEntry = z.infer<typeof tocEntrySchema>;

export const documentSummarySchema = z
  .object({
    id: z.number().int(),
    kind: z.enum(['section', 'log_entry']),
    title: z.string(),
    position: z.number().int(),
    loggedOn: z.string().nullable(),
    revision: z.number().int(),
    html: z.string(),
    toc: z.array(tocEntrySchema),
    updatedAt: z.string(),
    /** Set when moderators hid it; only people who may still see it receive it (moderation.ts). */
    hidden: hiddenInfoSchema.nullable().optional(),
  })
  .meta({ id: 'DocumentSummary' });
export type DocumentSummary = z.infer<typeof documentSummarySchema>;

export const viewerPermissionsSchema = z.object({ canEdit: z.boolean(), canOwn: z.boolean(), canRestore: z.boolean() });
export type ViewerPermissions = z.infer<typeof viewerPermissionsSchema>;

export const projectDetailSchema = z
  .object({
    id: z.number().int(),
    slug: z.string(),
    title: z.string(),
    summary: z.string(),
    licence: z.enum(licenceIds),
    licenceOther: z.string(),
    repoUrl: z.string(),
    hazards: z.array(z.enum(hazards)),
    status: z.enum(projectStatuses),
    revision: z.number().int(),
    owner: userSummarySchema,
    members: z.array(memberSchema),
    boardRevisions: z.array(boardRevisionSchema),
    sections: z.array(documentSummarySchema),
    logEntries: z.array(documentSummarySchema),
    createdAt: z.string(),
    updatedAt: z.string(),
    publishedAt: z.string().nullable(),
    cover: projectCoverSchema.nullable(),
    viewer: viewerPermissionsSchema,
    /** Set when moderators hid it; only people who may still see it receive it (moderation.ts). */
    hidden: hiddenInfoSchema.nullable().optional(),
  })
  .meta({ id: 'ProjectDetail' });
export type ProjectDetail = z.infer<typeof projectDetailSchema>;

export const deleteProjectSchema = z
  .strictObject({ confirmSlug: z.string().max(80) })
  .meta({ id: 'DeleteProject' });

export const editorInputSchema = z.strictObject({ handle: z.string().trim().min(1).max(39) }).meta({ id: 'AddEditor' });
export const editorParamsSchema = z.strictObject({ slug: slugSchema, handle: z.string().min(1).max(39) });

export const deletedProjectSchema = z
  .object({ slug: z.string(), title: z.string(), owner: userSummarySchema, deletedAt: z.string(), purgeAfter: z.string() })
  .meta({ id: 'DeletedProject' });
export const deletedProjectListSchema = z.object({ items: z.array(deletedProjectSchema) }).meta({ id: 'DeletedProjectList' });
export type DeletedProject = z.infer<typeof deletedProjectSchema>;

// ---------------------------------------------------------------------------------------------
// Documents: write-up sections and build-log entries

export const MAX_DOCUMENT_CHARS = 200_000;

export const documentContentSchema = z.strictObject({
  title: line({ max: 160, label: 'Title' }),
  body: prose({ max: MAX_DOCUMENT_CHARS, label: 'Text' }),
  /** Log entries only: the day the entry is about. */
  loggedOn: isoDate.nullable().default(null),
});
export type DocumentContent = z.infer<typeof documentContentSchema>;

export const newSectionSchema = z
  .strictObject({
    title: line({ max: 160, label: 'Title' }),
    body: prose({ max: MAX_DOCUMENT_CHARS, label: 'Text' }).default(''),
  })
  .meta({ id: 'NewSection' });
export type NewSection = z.input<typeof newSectionSchema>;

export const newLogEntrySchema = z
  .strictObject({
    title: line({ max: 160, label: 'Title' }),
    loggedOn: isoDate,
    body: prose({ max: MAX_DOCUMENT_CHARS, label: 'Text' }).default(''),
  })
  .meta({ id: 'NewLogEntry' });
export type NewLogEntry = z.input<typeof newLogEntrySchema>;

/**
 * A save. `baseRevision` is the revision the writer started from (or send `If-Match: "<n>"`);
 * without either the save is refused with 428.
 */
export const saveDocumentSchema = z
  .strictObject({
    baseRevision: revisionNumberSchema.optional(),
    title: line({ max: 160, label: 'Title' }),
    body: prose({ max: MAX_DOCUMENT_CHARS, label: 'Text' }),
    loggedOn: isoDate.nullable().default(null),
    message: line({ min: 0, max: 200, label: 'Message' }).default(''),
  })
  .meta({ id: 'SaveDocument' });
export type SaveDocument = z.input<typeof saveDocumentSchema>;

export const documentParamsSchema = z.strictObject({ slug: slugSchema, documentId: z.coerce.number().int().min(1) });
export const revisionParamsSchema = documentParamsSchema.extend({ number: z.coerce.number().int().min(1) });
export const projectRevisionParamsSchema = slugParamsSchema.extend({ number: z.coerce.number().int().min(1) });

export const documentDetailSchema = documentSummarySchema
  .extend({
    body: z.string(),
    projectSlug: z.string(),
    projectTitle: z.string(),
    projectStatus: z.enum(projectStatuses),
    viewer: viewerPermissionsSchema,
  })
  .meta({ id: 'DocumentDetail' });
export type DocumentDetail = z.infer<typeof documentDetailSchema>;

export const sectionOrderSchema = z
  .strictObject({ ids: z.array(z.number().int().min(1)).min(1).max(200) })
  .meta({ id: 'SectionOrder' });

// ---------------------------------------------------------------------------------------------
// Revisions and saves

export const revisionOrigins = ['create', 'edit', 'merge', 'restore', 'proposal', 'resolve'] as const;

export const revisionSummarySchema = z
  .object({
    number: z.number().int(),
    parentNumber: z.number().int().nullable(),
    author: userSummarySchema,
    creditedTo: userSummarySchema.nullable(),
    message: z.string(),
    contentHash: z.string(),
    origin: z.enum(revisionOrigins),
    createdAt: z.string(),
  })
  .meta({ id: 'RevisionSummary' });
export type RevisionSummary = z.infer<typeof revisionSummarySchema>;

export const revisionListSchema = z.object({ items: z.array(revisionSummarySchema) }).meta({ id: 'RevisionList' });
export type RevisionList = z.infer<typeof revisionListSchema>;

/** One full revision: `title`/`body` for documents, `fields` for structured records. */
export const revisionDetailSchema = revisionSummarySchema
  .extend({
    title: z.string().nullable(),
    body: z.string().nullable(),
    fields: z.record(z.string(), z.unknown()).nullable(),
  })
  .meta({ id: 'RevisionDetail' });
export type RevisionDetail = z.infer<typeof revisionDetailSchema>;

export const restoreSchema = z
  .strictObject({ number: z.number().int().min(1), baseRevision: revisionNumberSchema.optional(), message: line({ min: 0, max: 200 }).default('') })
  .meta({ id: 'Restore' });
export type Restore = z.input<typeof restoreSchema>;

/**
 * What a save did: `saved` on the latest revision; `merged` when the item had moved on and the
 * changes did not overlap (the answer says which revisions were merged); `unchanged` when
 * nothing differed from the current revision.
 */
export const saveOutcomeSchema = z.enum(['saved', 'merged', 'unchanged']);
export type SaveOutcome = z.infer<typeof saveOutcomeSchema>;

export const documentSaveResultSchema = z
  .object({
    outcome: saveOutcomeSchema,
    /** With `merged`: the revision the save was based on and the one it was merged with. */
    mergedWith: z.object({ base: z.number().int(), theirs: z.number().int() }).nullable(),
    document: documentDetailSchema,
  })
  .meta({ id: 'DocumentSaveResult' });
export type DocumentSaveResult = z.infer<typeof documentSaveResultSchema>;

export const projectSaveResultSchema = z
  .object({
    outcome: saveOutcomeSchema,
    mergedWith: z.object({ base: z.number().int(), theirs: z.number().int() }).nullable(),
    project: projectDetailSchema,
  })
  .meta({ id: 'ProjectSaveResult' });
export type ProjectSaveResult = z.infer<typeof projectSaveResultSchema>;

/**
 * `details` of a 409 `edit_conflict`: the current stored content and what overlapped.
 * `chunks` (for the text body) alternate stable text and conflicting regions with ours, base
 * and theirs; `fieldConflicts` lists single-value fields both sides changed.
 */
export const mergeChunkSchema = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('stable'), text: z.string() }),
  z.object({
    kind: z.literal('conflict'),
    id: z.string(),
    ours: z.string(),
    base: z.string(),
    theirs: z.string(),
    lines: z.object({ ours: z.number(), base: z.number(), theirs: z.number() }),
  }),
]);

export const editConflictSchema = z
  .object({
    baseRevision: z.number().int(),
    current: z.object({
      revision: z.number().int(),
      fields: z.record(z.string(), z.unknown()),
      author: userSummarySchema.nullable(),
      createdAt: z.string(),
    }),
    /** Merged text with conflict regions, per multi-line field (e.g. `body`). */
    chunks: z.record(z.string(), z.array(mergeChunkSchema)),
    /** Fields both sides changed to different single values. */
    fieldConflicts: z.array(z.object({ field: z.string(), base: z.unknown(), ours: z.unknown(), theirs: z.unknown() })),
    /** Fields merged without conflict, to keep while resolving. */
    merged: z.record(z.string(), z.unknown()),
  })
  .meta({ id: 'EditConflict' });
export type EditConflict = z.infer<typeof editConflictSchema>;
