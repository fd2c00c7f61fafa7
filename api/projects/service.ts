import type {
  BoardRevision,
  BoardRevisionInput,
  CreateProject,
  DeletedProject,
  DocumentSummary,
  ProjectCard,
  ProjectDetail,
  ProjectList,
  ProjectMetaFields,
  ProjectSaveResult,
  RevisionDetail,
  RevisionList,
} from '../../shared/contracts/projects';
import { createProjectSchema } from '../../shared/contracts/projects';
import type { ProjectRole } from '../../shared/domain';
import { slugify } from '../../shared/text';
import type { Tx } from '../../db/client';
import { appendAudit } from '../audit/queries';
import type { AppContext } from '../context';
import { AppError, fail, isUniqueViolation } from '../http/errors';
import type { AuthUser } from '../http/routes';
import { renderCached } from '../markdown/cache';
import { insertRevision } from '../revisions/queries';
import { toRevisionDetail, toRevisionSummary } from '../revisions/present';
import { contentHash, saveVersioned, type VersionedStore } from '../revisions/versioned';
import * as revisionQueries from '../revisions/queries';
import { findUserByHandle } from '../users/queries';
import * as q from './queries';
import type { ProjectRow } from './queries';
import { insertDocumentWithRevision } from '../documents/queries';
import { errataNamingBoard } from '../errata/queries';
import { missingAltText } from '../uploads/alt-text';
import { imagesForMarkdown, type ImageMap } from '../uploads/images';
import { toCover, type UploadRow } from '../uploads/present';
import { coversOf } from '../uploads/queries';
import { syncUploadRefs } from '../uploads/refs';
import { hiddenOf, seesHidden, type Reader } from '../moderation/visibility';

export const PAGE_SIZE = 24;
/** Deleted projects can be restored by an admin for this long, then they are purged. */
export const RESTORE_DAYS = 30;
export const STANDARD_SECTIONS = ['Overview', 'Hardware', 'Firmware', 'Postmortem'] as const;

const iso = (d: Date | null) => (d ? d.toISOString() : null);

function toCard(row: q.CardRow, myRole: ProjectRole | null, cover: UploadRow | undefined): ProjectCard {
  return {
    slug: row.slug,
    title: row.title,
    summary: row.summary,
    status: row.status,
    hazards: row.hazards as ProjectCard['hazards'],
    owner: { id: row.ownerId, handle: row.ownerHandle, displayName: row.ownerName, avatarUrl: row.ownerAvatar },
    updatedAt: row.updatedAt.toISOString(),
    publishedAt: iso(row.publishedAt),
    myRole,
    cover: toCover(cover),
  };
}

export async function listPublishedProjects(ctx: AppContext, page: number): Promise<ProjectList> {
  const { rows, total } = await q.listPublished(ctx.db, PAGE_SIZE, (page - 1) * PAGE_SIZE);
  const covers = await coversOf(
    ctx.db,
    rows.map((r) => r.id),
  );
  return { items: rows.map((r) => toCard(r, null, covers.get(r.id))), total, page, pageSize: PAGE_SIZE };
}

export async function listMyProjects(ctx: AppContext, user: AuthUser): Promise<ProjectList> {
  const rows = await q.listMemberProjects(ctx.db, user.id);
  const covers = await coversOf(
    ctx.db,
    rows.map((r) => r.id),
  );
  return {
    items: rows.map((r) => toCard(r, r.myRole, covers.get(r.id))),
    total: rows.length,
    page: 1,
    pageSize: rows.length,
  };
}

export function metaFieldsOf(project: ProjectRow): ProjectMetaFields {
  return {
    title: project.title,
    summary: project.summary,
    licence: project.licence as ProjectMetaFields['licence'],
    licenceOther: project.licenceOther ?? '',
    repoUrl: project.repoUrl ?? '',
    hazards: [...project.hazards].sort() as ProjectMetaFields['hazards'],
  };
}

/**
 * Create a project with its owner, its first metadata revision and the standard write-up
 * sections (empty, each at revision 1), in one transaction.
 */
export async function createProject(ctx: AppContext, user: AuthUser, input: CreateProject): Promise<ProjectDetail> {
  const parsed = createProjectSchema.parse(input);
  const slug = parsed.slug ?? slugify(parsed.title);
  if (slug.length < 2) {
    throw fail.validation('Choose a web address (slug) for the project.', { issues: [{ path: 'slug', message: 'at least 2 characters' }] });
  }
  try {
    const project = await ctx.db.transaction(async (tx) => {
      const { slug: _slug, ...meta } = parsed;
      const fields: ProjectMetaFields = { ...meta };
      const row = await q.insertProject(tx, {
        slug,
        ownerId: user.id,
        title: fields.title,
        summary: fields.summary,
        licence: fields.licence,
        licenceOther: fields.licenceOther || null,
        repoUrl: fields.repoUrl || null,
        hazards: fields.hazards,
        currentRevision: 1,
      });
      await q.addMember(tx, row.id, user.id, 'owner');
      await insertRevision(tx, {
        subject: 'project',
        subjectId: row.id,
        projectId: row.id,
        number: 1,
        parentNumber: null,
        authorId: user.id,
        message: 'Created the project',
        fields,
        contentHash: contentHash(fields),
        origin: 'create',
      });
      for (const [position, title] of STANDARD_SECTIONS.entries()) {
        await insertDocumentWithRevision(tx, {
          projectId: row.id,
          kind: 'section',
          title,
          body: '',
          position,
          loggedOn: null,
          authorId: user.id,
        });
      }
      return row;
    });
    return projectDetail(ctx, project, 'owner');
  } catch (error) {
    if (isUniqueViolation(error, 'projects_slug_key')) {
      const suggestion = await freeSlug(ctx, slug);
      throw new AppError('conflict', `The address /projects/${slug} is taken.`, {
        issues: [{ path: 'slug', message: `taken; ${suggestion} is free` }],
        suggestion,
      });
    }
    throw error;
  }
}

async function freeSlug(ctx: AppContext, slug: string): Promise<string> {
  for (let n = 2; n < 100; n++) {
    const candidate = `${slug.slice(0, 76)}-${n}`;
    if (!(await q.slugTaken(ctx.db, candidate))) return candidate;
  }
  return `${slug.slice(0, 70)}-${Date.now().toString(36)}`;
}

/** `images`: the photos the notes may show (api/uploads/images.ts). */
export function toBoardRevision(
  row: Awaited<ReturnType<typeof q.listBoardRevisions>>[number],
  images?: ImageMap,
): BoardRevision {
  return {
    id: row.id,
    label: row.label,
    releasedOn: row.releasedOn,
    notes: row.notes,
    notesHtml: renderCached(`board:${row.id}`, row.notes, 'bn', images).html,
    position: row.position,
  };
}

/** `images`: the photos the text may show (api/uploads/images.ts). */
export function toDocumentSummary(
  doc: Awaited<ReturnType<typeof q.listLiveDocuments>>[number],
  images?: ImageMap,
): DocumentSummary {
  const rendered = renderCached(`doc:${doc.id}:${doc.currentRevision}`, doc.body, `d${doc.id}-`, images);
  return {
    id: doc.id,
    kind: doc.kind,
    title: doc.title,
    position: doc.position,
    loggedOn: doc.loggedOn,
    revision: doc.currentRevision,
    html: rendered.html,
    toc: rendered.toc,
    updatedAt: doc.updatedAt.toISOString(),
    hidden: hiddenOf(doc),
  };
}

/** What the viewer may do here; members edit, the owner also manages editors and deletion. */
export function viewerOf(role: ProjectRole | null) {
  return { canEdit: role !== null, canOwn: role === 'owner', canRestore: role !== null };
}

/**
 * The page data of a project, cached per process under a key that changes with every change
 * to the project: every write to a project, its documents, board revisions or members bumps
 * `change_seq` (touchProject), and the key includes it, so a stale entry is never served after
 * a change — also across API processes, which each read the row fresh. What the key cannot see
 * (the owner renaming themselves) is bounded by a short lifetime.
 */
const DETAIL_TTL_MS = 30_000;
const DETAIL_LIMIT = 500;
const detailCache = new Map<string, { at: number; detail: Omit<ProjectDetail, 'viewer'> }>();

export async function projectDetail(
  ctx: AppContext,
  project: ProjectRow,
  role: ProjectRole | null,
  user: AuthUser | null = null,
): Promise<ProjectDetail> {
  const key = `${project.id}:${project.changeSeq}`;
  const hit = detailCache.get(key);
  let detail = hit && Date.now() - hit.at < DETAIL_TTL_MS ? hit.detail : undefined;
  if (!detail) {
    detail = await loadProjectDetail(ctx, project);
    detailCache.set(key, { at: Date.now(), detail });
    if (detailCache.size > DETAIL_LIMIT) detailCache.delete(detailCache.keys().next().value as string);
  }
  return { ...forReader(detail, { user, projectRole: role }), viewer: viewerOf(role) };
}

/** The cached page holds hidden sections and log entries; only those who may see them get them. */
function forReader(detail: Omit<ProjectDetail, 'viewer'>, reader: Reader): Omit<ProjectDetail, 'viewer'> {
  if (seesHidden(reader)) return detail;
  return {
    ...detail,
    sections: detail.sections.filter((d) => !d.hidden),
    logEntries: detail.logEntries.filter((d) => !d.hidden),
  };
}

async function loadProjectDetail(ctx: AppContext, project: ProjectRow): Promise<Omit<ProjectDetail, 'viewer'>> {
  const [owner, members, boards, docs] = await Promise.all([
    q.findOwner(ctx.db, project.ownerId),
    q.listMembers(ctx.db, project.id),
    q.listBoardRevisions(ctx.db, project.id),
    q.listLiveDocuments(ctx.db, project.id),
  ]);
  if (!owner) throw new Error(`project ${project.id} has no owner row`);
  const [images, covers] = await Promise.all([
    imagesForMarkdown(ctx.db, [...docs.map((d) => d.body), ...boards.map((b) => b.notes)], project.id),
    project.coverUploadId !== null ? coversOf(ctx.db, [project.id]) : new Map<number, UploadRow>(),
  ]);
  const sections = docs.filter((d) => d.kind === 'section').sort((a, b) => a.position - b.position || a.id - b.id);
  const logEntries = docs
    .filter((d) => d.kind === 'log_entry')
    .sort((a, b) => (b.loggedOn ?? '').localeCompare(a.loggedOn ?? '') || b.id - a.id);
  return {
    id: project.id,
    slug: project.slug,
    ...metaFieldsOf(project),
    status: project.status,
    revision: project.currentRevision,
    owner,
    members,
    boardRevisions: boards.map((b) => toBoardRevision(b, images)),
    sections: sections.map((d) => toDocumentSummary(d, images)),
    logEntries: logEntries.map((d) => toDocumentSummary(d, images)),
    createdAt: project.createdAt.toISOString(),
    updatedAt: project.updatedAt.toISOString(),
    publishedAt: iso(project.publishedAt),
    cover: toCover(covers.get(project.id)),
    hidden: hiddenOf(project),
  };
}

async function reload(ctx: AppContext, project: ProjectRow): Promise<ProjectRow> {
  const fresh = await q.findProjectById(ctx.db, project.id);
  if (!fresh || fresh.deletedAt) throw fail.notFound('The project');
  return fresh;
}

function metaStore(project: ProjectRow): VersionedStore<ProjectMetaFields> {
  return {
    subject: 'project',
    subjectId: project.id,
    projectId: project.id,
    textFields: [],
    async loadCurrent(tx: Tx) {
      const row = await q.lockProject(tx, project.id);
      if (!row || row.deletedAt) throw fail.notFound('The project');
      return { revision: row.currentRevision, fields: metaFieldsOf(row) };
    },
    write: (tx, expected, fields) => q.writeProjectMeta(tx, project.id, expected, fields),
    toRow: (fields) => ({ fields }),
    fromRow: (row) => row.fields as ProjectMetaFields,
  };
}

export async function updateProjectMeta(
  ctx: AppContext,
  user: AuthUser,
  project: ProjectRow,
  role: ProjectRole | null,
  input: ProjectMetaFields & { message: string },
  baseRevision: number,
  origin: 'edit' | 'restore' = 'edit',
): Promise<ProjectSaveResult> {
  const { message, ...fields } = input;
  if (fields.licence === 'other' && !fields.licenceOther) {
    throw fail.validation('Describe the licence when choosing "Other".', { issues: [{ path: 'licenceOther', message: 'required' }] });
  }
  const result = await saveVersioned(ctx.db, metaStore(project), {
    authorId: user.id,
    baseRevision,
    fields,
    message,
    origin,
  });
  return {
    outcome: result.outcome,
    mergedWith: result.mergedWith,
    project: await projectDetail(ctx, await reload(ctx, project), role),
  };
}

export async function setPublished(
  ctx: AppContext,
  user: AuthUser,
  project: ProjectRow,
  role: ProjectRole | null,
  published: boolean,
): Promise<ProjectDetail> {
  if (published) {
    // Every photo the project shows must say what it shows before anyone else can read it.
    const missing = await missingAltText(ctx, project);
    if (missing) {
      const count = missing.images.length;
      throw new AppError(
        'validation_failed',
        `${count === 1 ? 'One photo needs' : `${count} photos need`} alt text before the project can be published: describe ${count === 1 ? 'it' : 'each'} for readers who cannot see it.`,
        missing,
      );
    }
  }
  await q.setStatus(ctx.db, project.id, published ? 'published' : 'draft');
  return projectDetail(ctx, await reload(ctx, project), role);
}

/** Soft delete: gone for everyone at once, restorable by an admin for RESTORE_DAYS. */
export async function deleteProject(ctx: AppContext, user: AuthUser, project: ProjectRow, confirmSlug: string) {
  if (confirmSlug !== project.slug) {
    throw fail.validation('Type the project address exactly to confirm deleting it.', {
      issues: [{ path: 'confirmSlug', message: `type ${project.slug}` }],
    });
  }
  await ctx.db.transaction(async (tx) => {
    await q.softDeleteProject(tx, project.id, user.id);
    await appendAudit(tx, {
      actorId: user.id,
      action: 'project.delete',
      targetKind: 'project',
      targetId: project.id,
      projectId: project.id,
      before: { slug: project.slug, status: project.status },
      after: { deleted: true },
    });
  });
}

export async function listDeletedProjects(ctx: AppContext): Promise<{ items: DeletedProject[] }> {
  const rows = await q.listDeleted(ctx.db);
  return {
    items: rows.map((r) => ({
      slug: r.slug,
      title: r.title,
      owner: { id: r.ownerId, handle: r.ownerHandle, displayName: r.ownerName, avatarUrl: r.ownerAvatar },
      deletedAt: r.deletedAt!.toISOString(),
      purgeAfter: new Date(r.deletedAt!.getTime() + RESTORE_DAYS * 86_400_000).toISOString(),
    })),
  };
}

export async function restoreDeletedProject(ctx: AppContext, admin: AuthUser, slug: string): Promise<ProjectDetail> {
  const project = await q.findDeletedProject(ctx.db, slug);
  if (!project) throw fail.notFound('A deleted project with that address');
  await ctx.db.transaction(async (tx) => {
    await q.undeleteProject(tx, project.id);
    await appendAudit(tx, {
      actorId: admin.id,
      action: 'project.restore',
      targetKind: 'project',
      targetId: project.id,
      projectId: project.id,
      before: { deleted: true },
      after: { deleted: false },
    });
  });
  return projectDetail(ctx, await reload(ctx, project), null);
}

/** Hard-deletes projects whose restore window has passed. Returns their slugs. */
export async function purgeExpiredProjects(ctx: AppContext, now = new Date()): Promise<string[]> {
  return q.purgeDeletedBefore(ctx.db, new Date(now.getTime() - RESTORE_DAYS * 86_400_000));
}

export async function addEditor(ctx: AppContext, owner: AuthUser, project: ProjectRow, handle: string): Promise<ProjectDetail> {
  const member = await findUserByHandle(ctx.db, handle.replace(/^@/, ''));
  if (!member || member.suspendedAt) throw fail.notFound(`Member @${handle}`);
  const current = await q.memberRole(ctx.db, project.id, member.id);
  if (current === 'owner') throw fail.conflict('The owner already has every right on the project.');
  await q.addMember(ctx.db, project.id, member.id, 'editor');
  await q.touchProject(ctx.db, project.id);
  return projectDetail(ctx, await reload(ctx, project), 'owner');
}

export async function removeEditor(ctx: AppContext, owner: AuthUser, project: ProjectRow, handle: string): Promise<ProjectDetail> {
  const member = await findUserByHandle(ctx.db, handle.replace(/^@/, ''));
  if (!member) throw fail.notFound(`Member @${handle}`);
  const removed = await q.removeMember(ctx.db, project.id, member.id);
  if (!removed) throw fail.notFound(`@${handle} as an editor of this project`);
  await q.touchProject(ctx.db, project.id);
  return projectDetail(ctx, await reload(ctx, project), 'owner');
}

// --- board revisions -----------------------------------------------------------------------

async function presentBoard(
  ctx: AppContext,
  project: ProjectRow,
  row: Awaited<ReturnType<typeof q.listBoardRevisions>>[number],
) {
  return toBoardRevision(row, await imagesForMarkdown(ctx.db, [row.notes], project.id));
}

export async function addBoardRevision(ctx: AppContext, project: ProjectRow, input: Required<BoardRevisionInput>): Promise<BoardRevision> {
  try {
    const row = await ctx.db.transaction(async (tx) => {
      const created = await q.insertBoardRevision(tx, {
        projectId: project.id,
        label: input.label,
        releasedOn: input.releasedOn,
        notes: input.notes,
        position: await q.nextBoardPosition(tx, project.id),
      });
      await syncUploadRefs(tx, 'board_revision', created.id, project.id, [created.notes]);
      await q.touchProject(tx, project.id);
      return created;
    });
    return presentBoard(ctx, project, row);
  } catch (error) {
    if (isUniqueViolation(error, 'board_revisions_label_key')) throw fail.conflict(`This project already has a board revision "${input.label}".`);
    throw error;
  }
}

export async function updateBoardRevision(
  ctx: AppContext,
  project: ProjectRow,
  id: number,
  input: Required<BoardRevisionInput>,
): Promise<BoardRevision> {
  try {
    const row = await ctx.db.transaction(async (tx) => {
      const updated = await q.updateBoardRevision(tx, project.id, id, input);
      if (!updated) throw fail.notFound('The board revision');
      await syncUploadRefs(tx, 'board_revision', updated.id, project.id, [updated.notes]);
      await q.touchProject(tx, project.id);
      return updated;
    });
    return presentBoard(ctx, project, row);
  } catch (error) {
    if (isUniqueViolation(error, 'board_revisions_label_key')) throw fail.conflict(`This project already has a board revision "${input.label}".`);
    throw error;
  }
}

export async function removeBoardRevision(ctx: AppContext, project: ProjectRow, id: number): Promise<void> {
  // Errata name board revisions in their history; removing one under them would rewrite it.
  const naming = await errataNamingBoard(ctx.db, project.id, id);
  if (naming.length) {
    throw fail.conflict(`This board revision is named in ${naming.map((n) => `E${n}`).join(', ')}. Change those errata first.`);
  }
  await ctx.db.transaction(async (tx) => {
    if (!(await q.deleteBoardRevision(tx, project.id, id))) throw fail.notFound('The board revision');
    await syncUploadRefs(tx, 'board_revision', id, project.id, []);
    await q.touchProject(tx, project.id);
  });
}

// --- metadata history -----------------------------------------------------------------------

export async function projectRevisions(ctx: AppContext, project: ProjectRow): Promise<RevisionList> {
  const rows = await revisionQueries.listRevisions(ctx.db, 'project', project.id);
  return { items: rows.map(toRevisionSummary) };
}

export async function projectRevision(ctx: AppContext, project: ProjectRow, number: number): Promise<RevisionDetail> {
  const row = await revisionQueries.findRevision(ctx.db, 'project', project.id, number);
  if (!row) throw fail.notFound(`Revision ${number}`);
  return toRevisionDetail(row);
}

export async function restoreProjectRevision(
  ctx: AppContext,
  user: AuthUser,
  project: ProjectRow,
  role: ProjectRole | null,
  number: number,
  baseRevision: number,
  message: string,
): Promise<ProjectSaveResult> {
  const row = await revisionQueries.findRevision(ctx.db, 'project', project.id, number);
  if (!row) throw fail.notFound(`Revision ${number}`);
  const fields = row.fields as ProjectMetaFields;
  return updateProjectMeta(
    ctx,
    user,
    project,
    role,
    { ...fields, message: message || `Restored revision ${number}` },
    baseRevision,
    'restore',
  );
}
