import type {
  DocumentDetail,
  DocumentSaveResult,
  NewLogEntry,
  NewSection,
  ProjectDetail,
  RevisionDetail,
  RevisionList,
} from '../../shared/contracts/projects';
import type { ProjectRole } from '../../shared/domain';
import type { Tx } from '../../db/client';
import type { AppContext } from '../context';
import { fail } from '../http/errors';
import type { AuthUser } from '../http/routes';
import type { ProjectRow } from '../projects/queries';
import * as projectQueries from '../projects/queries';
import { projectDetail, toDocumentSummary, viewerOf } from '../projects/service';
import * as revisionQueries from '../revisions/queries';
import { toRevisionDetail, toRevisionSummary } from '../revisions/present';
import { saveVersioned, type VersionedStore } from '../revisions/versioned';
import { imagesForMarkdown, type ImageMap } from '../uploads/images';
import { syncUploadRefs } from '../uploads/refs';
import * as q from './queries';
import { refuseHidden, type Reader } from '../moderation/visibility';

/** `images`: the photos the text may show (api/uploads/images.ts). */
export function toDocumentDetail(
  project: ProjectRow,
  doc: q.DocumentRow,
  role: ProjectRole | null,
  images?: ImageMap,
): DocumentDetail {
  return {
    ...toDocumentSummary(doc, images),
    body: doc.body,
    projectSlug: project.slug,
    projectTitle: project.title,
    projectStatus: project.status,
    viewer: viewerOf(role),
  };
}

async function present(
  ctx: AppContext,
  project: ProjectRow,
  doc: q.DocumentRow,
  role: ProjectRole | null,
): Promise<DocumentDetail> {
  return toDocumentDetail(project, doc, role, await imagesForMarkdown(ctx.db, [doc.body], project.id));
}

/** With a `reader`: a hidden document answers 410 with the reason to those who may not see it. */
async function load(ctx: AppContext, project: ProjectRow, id: number, reader?: Reader): Promise<q.DocumentRow> {
  const doc = await q.findDocument(ctx.db, project.id, id);
  if (!doc) throw fail.notFound('The section or log entry');
  if (reader) refuseHidden(doc, reader, 'This section or log entry');
  return doc;
}

export async function getDocument(
  ctx: AppContext,
  project: ProjectRow,
  role: ProjectRole | null,
  id: number,
  user: AuthUser | null = null,
): Promise<DocumentDetail> {
  return present(ctx, project, await load(ctx, project, id, { user, projectRole: role }), role);
}

export async function addSection(
  ctx: AppContext,
  user: AuthUser,
  project: ProjectRow,
  role: ProjectRole | null,
  input: Required<NewSection>,
): Promise<DocumentDetail> {
  const doc = await ctx.db.transaction(async (tx) => {
    const created = await q.insertDocumentWithRevision(tx, {
      projectId: project.id,
      kind: 'section',
      title: input.title,
      body: input.body,
      position: await q.nextSectionPosition(tx, project.id),
      loggedOn: null,
      authorId: user.id,
    });
    await syncUploadRefs(tx, 'document', created.id, project.id, [created.body]);
    await projectQueries.touchProject(tx, project.id);
    return created;
  });
  return present(ctx, project, doc, role);
}

export async function addLogEntry(
  ctx: AppContext,
  user: AuthUser,
  project: ProjectRow,
  role: ProjectRole | null,
  input: Required<NewLogEntry>,
): Promise<DocumentDetail> {
  const doc = await ctx.db.transaction(async (tx) => {
    const created = await q.insertDocumentWithRevision(tx, {
      projectId: project.id,
      kind: 'log_entry',
      title: input.title,
      body: input.body,
      position: 0,
      loggedOn: input.loggedOn,
      authorId: user.id,
    });
    await syncUploadRefs(tx, 'document', created.id, project.id, [created.body]);
    await projectQueries.touchProject(tx, project.id);
    return created;
  });
  return present(ctx, project, doc, role);
}

export function documentStore(project: ProjectRow, doc: q.DocumentRow): VersionedStore<q.DocumentFields> {
  return {
    subject: 'document',
    subjectId: doc.id,
    projectId: project.id,
    textFields: ['body'],
    async loadCurrent(tx: Tx) {
      const row = await q.lockDocument(tx, project.id, doc.id);
      if (!row) throw fail.notFound('The section or log entry');
      return { revision: row.currentRevision, fields: q.fieldsOf(row) };
    },
    // Every save of the text (edits, restores, accepted proposals) updates its upload references.
    async write(tx, expected, fields) {
      if (!(await q.writeDocument(tx, doc.id, expected, fields))) return false;
      await syncUploadRefs(tx, 'document', doc.id, project.id, [fields.body]);
      return true;
    },
    toRow: (fields) => ({ title: fields.title, body: fields.body, fields: { loggedOn: fields.loggedOn } }),
    fromRow: (row) => ({
      title: row.title ?? '',
      body: row.body ?? '',
      loggedOn: ((row.fields as { loggedOn?: string | null } | null)?.loggedOn ?? null) as string | null,
    }),
  };
}

export interface DocumentSave {
  title: string;
  body: string;
  loggedOn: string | null;
  message: string;
}

export async function saveDocument(
  ctx: AppContext,
  user: AuthUser,
  project: ProjectRow,
  role: ProjectRole | null,
  id: number,
  input: DocumentSave,
  baseRevision: number,
  origin: 'edit' | 'restore' | 'resolve' = 'edit',
  credit?: { userId: number; proposalId: number },
): Promise<DocumentSaveResult> {
  const doc = await load(ctx, project, id);
  if (doc.kind === 'log_entry' && !input.loggedOn) {
    throw fail.validation('A log entry needs its date.', { issues: [{ path: 'loggedOn', message: 'required' }] });
  }
  const fields: q.DocumentFields = {
    title: input.title,
    body: input.body,
    loggedOn: doc.kind === 'log_entry' ? input.loggedOn : null,
  };
  const result = await saveVersioned(
    ctx.db,
    documentStore(project, doc),
    {
      authorId: user.id,
      baseRevision,
      fields,
      message: input.message,
      origin: credit ? 'proposal' : origin,
      creditedUserId: credit?.userId ?? null,
      proposalId: credit?.proposalId ?? null,
    },
    (tx) => projectQueries.touchProject(tx, project.id),
  );
  return {
    outcome: result.outcome,
    mergedWith: result.mergedWith,
    document: await present(ctx, project, await load(ctx, project, id), role),
  };
}

export async function removeDocument(ctx: AppContext, project: ProjectRow, id: number): Promise<void> {
  await ctx.db.transaction(async (tx) => {
    if (!(await q.softDeleteDocument(tx, project.id, id))) throw fail.notFound('The section or log entry');
    // A removed text keeps nothing alive; its photos are swept after the grace period.
    await syncUploadRefs(tx, 'document', id, project.id, []);
    await projectQueries.touchProject(tx, project.id);
  });
}

export async function reorderSections(
  ctx: AppContext,
  user: AuthUser,
  project: ProjectRow,
  role: ProjectRole | null,
  ids: number[],
): Promise<ProjectDetail> {
  await ctx.db.transaction(async (tx) => {
    const current = new Set(await projectQueries.sectionIds(tx, project.id));
    const given = new Set(ids);
    if (given.size !== ids.length || current.size !== given.size || [...current].some((id) => !given.has(id))) {
      throw fail.validation('Give every section of the project exactly once, in the new order.', {
        issues: [{ path: 'ids', message: `expected the ${current.size} section ids of this project` }],
      });
    }
    await projectQueries.setSectionPositions(tx, project.id, ids);
    await projectQueries.touchProject(tx, project.id);
  });
  const fresh = await projectQueries.findProjectById(ctx.db, project.id);
  return projectDetail(ctx, fresh ?? project, role);
}

export async function documentRevisions(ctx: AppContext, project: ProjectRow, id: number, reader?: Reader): Promise<RevisionList> {
  const doc = await load(ctx, project, id, reader);
  const rows = await revisionQueries.listRevisions(ctx.db, 'document', doc.id);
  return { items: rows.map(toRevisionSummary) };
}

export async function documentRevision(
  ctx: AppContext,
  project: ProjectRow,
  id: number,
  number: number,
  reader?: Reader,
): Promise<RevisionDetail> {
  const doc = await load(ctx, project, id, reader);
  const row = await revisionQueries.findRevision(ctx.db, 'document', doc.id, number);
  if (!row) throw fail.notFound(`Revision ${number}`);
  return toRevisionDetail(row);
}

/** Restoring appends: the chosen revision's content becomes a new revision; history stays. */
export async function restoreDocumentRevision(
  ctx: AppContext,
  user: AuthUser,
  project: ProjectRow,
  role: ProjectRole | null,
  id: number,
  number: number,
  baseRevision: number,
  message: string,
): Promise<DocumentSaveResult> {
  const doc = await load(ctx, project, id);
  const row = await revisionQueries.findRevision(ctx.db, 'document', doc.id, number);
  if (!row) throw fail.notFound(`Revision ${number}`);
  const fields = documentStore(project, doc).fromRow(row);
  return saveDocument(
    ctx,
    user,
    project,
    role,
    id,
    { ...fields, message: message || `Restored revision ${number}` },
    baseRevision,
    'restore',
  );
}
