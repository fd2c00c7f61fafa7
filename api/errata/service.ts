/**
 * Errata: numbered per project (E1, E2 … never reused), every change a revision with the
 * same no-lost-update rule as write-ups (api/revisions/versioned.ts). Tags ride along with an
 * erratum but are not part of its revisions: moderators curate them separately.
 */
import type {
  CreateErratum,
  Erratum,
  ErratumDetail,
  ErratumFields,
  ErratumList,
  ErratumSaveResult,
} from '../../shared/contracts/errata';
import type { RevisionDetail, RevisionList } from '../../shared/contracts/projects';
import { erratumStatusLabels, severityLabels, type ProjectRole } from '../../shared/domain';
import type { Tx } from '../../db/client';
import type { AppContext } from '../context';
import { fail } from '../http/errors';
import type { AuthUser } from '../http/routes';
import { renderCached } from '../markdown/cache';
import type { ProjectRow } from '../projects/queries';
import { touchProject } from '../projects/queries';
import { viewerOf } from '../projects/service';
import * as revisionQueries from '../revisions/queries';
import { toRevisionDetail, toRevisionSummary } from '../revisions/present';
import { contentHash, saveVersioned, type VersionedStore } from '../revisions/versioned';
import { currentTagIds, resolveTagIds, tagRefsByIds } from '../tags/service';
import { imagesForMarkdown, type ImageMap } from '../uploads/images';
import { syncUploadRefs } from '../uploads/refs';
import * as q from './queries';
import { hiddenOf, refuseHidden, seesHidden, type Reader } from '../moderation/visibility';
import { notifyNewErratum } from './notify';
import { withNotifications } from '../notifications/service';

/** The versioned form of an erratum: every value a string or a set of strings (merge-friendly). */
export interface ErratumRevisionFields {
  [key: string]: string | string[];
  title: string;
  category: string;
  severity: string;
  status: string;
  affected: string[];
  fixedIn: string;
  refdes: string[];
  parts: string[];
  pins: string[];
  symptom: string;
  cause: string;
  workaround: string;
  fix: string;
  reportedByText: string;
}

export const ERRATUM_TEXT_FIELDS = ['symptom', 'cause', 'workaround', 'fix'] as const;

export const code = (number: number) => `E${number}`;

export function toRevisionFields(fields: ErratumFields): ErratumRevisionFields {
  return {
    title: fields.title,
    category: fields.category,
    severity: fields.severity,
    status: fields.status,
    affected: fields.affected.map(String),
    fixedIn: fields.fixedIn === null ? '' : String(fields.fixedIn),
    refdes: fields.refdes,
    parts: fields.parts,
    pins: fields.pins,
    symptom: fields.symptom,
    cause: fields.cause,
    workaround: fields.workaround,
    fix: fields.fix,
    reportedByText: fields.reportedByText,
  };
}

export function fromRevisionFields(fields: ErratumRevisionFields): ErratumFields {
  return {
    title: fields.title,
    category: fields.category,
    severity: fields.severity as ErratumFields['severity'],
    status: fields.status as ErratumFields['status'],
    affected: fields.affected.map(Number).sort((a, b) => a - b),
    fixedIn: fields.fixedIn ? Number(fields.fixedIn) : null,
    refdes: fields.refdes,
    parts: fields.parts,
    pins: fields.pins,
    symptom: fields.symptom,
    cause: fields.cause,
    workaround: fields.workaround,
    fix: fields.fix,
    reportedByText: fields.reportedByText ?? '',
  };
}

export function fieldsOfRow(row: q.ErratumRow): ErratumFields {
  return {
    title: row.title,
    category: row.categorySlug,
    severity: row.severity,
    status: row.status,
    affected: [...row.affected].sort((a, b) => a - b),
    fixedIn: row.fixedInId,
    refdes: row.refdes,
    parts: row.parts,
    pins: row.pins,
    symptom: row.symptom,
    cause: row.cause,
    workaround: row.workaround,
    fix: row.fix,
    reportedByText: row.reportedByText ?? '',
  };
}

function stored(fields: ErratumFields): q.StoredErratumFields {
  return {
    title: fields.title,
    categorySlug: fields.category,
    severity: fields.severity,
    status: fields.status,
    affected: fields.affected,
    fixedInId: fields.fixedIn,
    refdes: fields.refdes,
    parts: fields.parts,
    pins: fields.pins,
    symptom: fields.symptom,
    cause: fields.cause,
    workaround: fields.workaround,
    fix: fields.fix,
    reportedByText: fields.reportedByText || null,
  };
}

/** Checks the values only the database knows: the category, and board revisions of this project. */
export async function checkAgainstProject(ctx: AppContext | { db: Tx }, project: ProjectRow, fields: ErratumFields) {
  const [boards, categories] = await Promise.all([q.projectBoards(ctx.db, project.id), q.listCategories(ctx.db)]);
  const boardIds = new Set(boards.map((b) => b.id));
  const issues: { path: string; message: string }[] = [];
  if (!categories.some((c) => c.slug === fields.category))
    issues.push({ path: 'category', message: 'not a known category' });
  if (fields.affected.some((id) => !boardIds.has(id)))
    issues.push({ path: 'affected', message: 'not a board revision of this project' });
  if (fields.fixedIn !== null && !boardIds.has(fields.fixedIn))
    issues.push({ path: 'fixedIn', message: 'not a board revision of this project' });
  if (issues.length) throw fail.validation('Some values do not fit this project.', { issues });
}

type Boards = Awaited<ReturnType<typeof q.projectBoards>>;

function render(row: q.ErratumRow, field: (typeof ERRATUM_TEXT_FIELDS)[number], images: ImageMap) {
  const key = `err:${row.id}:${row.currentRevision}:${field}`;
  return renderCached(key, row[field], `e${row.id}${field[0]}-`, images).html;
}

const textsOf = (row: Pick<q.ErratumRow, (typeof ERRATUM_TEXT_FIELDS)[number]>) =>
  ERRATUM_TEXT_FIELDS.map((field) => row[field]);

async function present(ctx: AppContext, rows: q.ErratumRow[], boards: Boards): Promise<Erratum[]> {
  const images = rows.length ? await imagesForMarkdown(ctx.db, rows.flatMap(textsOf), rows[0]!.projectId) : new Map();
  const categories = new Map((await q.listCategories(ctx.db)).map((c) => [c.slug, c]));
  const boardLabel = new Map(boards.map((b) => [b.id, b.label]));
  const tagIds = await q.tagIdsOfErrata(
    ctx.db,
    rows.map((r) => r.id),
  );
  const tagRefs = await tagRefsByIds(ctx.db, [...new Set([...tagIds.values()].flat())]);
  const counts = await q.commentCounts(
    ctx.db,
    rows.map((r) => r.id),
  );
  const reporters = await q.usersByIds(ctx.db, [
    ...new Set(rows.map((r) => r.reportedById).filter((id): id is number => id !== null)),
  ]);
  return rows.map((row) => ({
    id: row.id,
    number: row.number,
    code: code(row.number),
    title: row.title,
    category: { slug: row.categorySlug, name: categories.get(row.categorySlug)?.name ?? row.categorySlug },
    severity: row.severity,
    status: row.status,
    affected: row.affected
      .filter((id) => boardLabel.has(id))
      .sort((a, b) => a - b)
      .map((id) => ({ id, label: boardLabel.get(id)! })),
    fixedIn:
      row.fixedInId !== null && boardLabel.has(row.fixedInId)
        ? { id: row.fixedInId, label: boardLabel.get(row.fixedInId)! }
        : null,
    refdes: row.refdes,
    parts: row.parts,
    pins: row.pins,
    symptom: row.symptom,
    cause: row.cause,
    workaround: row.workaround,
    fix: row.fix,
    html: {
      symptom: render(row, 'symptom', images),
      cause: render(row, 'cause', images),
      workaround: render(row, 'workaround', images),
      fix: render(row, 'fix', images),
    },
    reportedBy: row.reportedById !== null ? (reporters.get(row.reportedById) ?? null) : null,
    reportedByText: row.reportedByText ?? '',
    tags: (tagIds.get(row.id) ?? []).map((id) => tagRefs.get(id)).filter((t) => t !== undefined),
    revision: row.currentRevision,
    commentCount: counts.get(row.id) ?? 0,
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
    hidden: hiddenOf(row),
  }));
}

export function erratumViewer(role: ProjectRole | null, user: AuthUser | null) {
  return { ...viewerOf(role), canPropose: user !== null && role === null };
}

export async function listProjectErrata(
  ctx: AppContext,
  project: ProjectRow,
  role: ProjectRole | null,
  user: AuthUser | null,
): Promise<ErratumList> {
  const [rows, boards, categories] = await Promise.all([
    q.listErrata(ctx.db, project.id, seesHidden({ user, projectRole: role })),
    q.projectBoards(ctx.db, project.id),
    q.listCategories(ctx.db),
  ]);
  return {
    items: await present(ctx, rows, boards),
    boards: boards.map((b) => ({ id: b.id, label: b.label })),
    categories: categories.map((c) => ({ slug: c.slug, name: c.name })),
    viewer: erratumViewer(role, user),
  };
}

/** With a `reader`: a hidden erratum answers 410 with the reason to those who may not see it. */
async function load(ctx: AppContext, project: ProjectRow, number: number, reader?: Reader): Promise<q.ErratumRow> {
  const row = await q.findErratum(ctx.db, project.id, number, reader !== undefined);
  if (!row) throw fail.notFound(`Erratum ${code(number)}`);
  if (reader) refuseHidden(row, reader, `Erratum ${code(number)}`);
  return row;
}

export async function erratumDetail(
  ctx: AppContext,
  project: ProjectRow,
  role: ProjectRole | null,
  user: AuthUser | null,
  row: q.ErratumRow,
): Promise<ErratumDetail> {
  const boards = await q.projectBoards(ctx.db, project.id);
  const [erratum] = await present(ctx, [row], boards);
  const lessons = await q.lessonsOfErratum(ctx.db, row.id);
  const lessonImages = await imagesForMarkdown(
    ctx.db,
    lessons.map((l) => l.body),
    project.id,
  );
  return {
    ...erratum!,
    projectSlug: project.slug,
    projectTitle: project.title,
    boards: boards.map((b) => ({ id: b.id, label: b.label })),
    lessons: lessons.map((l) => ({
      id: l.id,
      html: renderCached(`lesson:${l.id}:${l.revision}`, l.body, `l${l.id}-`, lessonImages).html,
    })),
    viewer: erratumViewer(role, user),
  };
}

export async function getErratum(
  ctx: AppContext,
  project: ProjectRow,
  role: ProjectRole | null,
  user: AuthUser | null,
  number: number,
): Promise<ErratumDetail> {
  return erratumDetail(ctx, project, role, user, await load(ctx, project, number, { user, projectRole: role }));
}

/**
 * Create an erratum in the caller's transaction: takes the next number, stores revision 1 and
 * the tags. `credit` names the member who reported it (a proposer whose proposal was accepted).
 */
export async function insertErratumWithRevision(
  tx: Tx,
  project: ProjectRow,
  author: AuthUser,
  fields: ErratumFields,
  options: {
    tagIds: number[];
    message: string;
    reportedById?: number | null;
    proposalId?: number | null;
    origin?: 'create' | 'proposal';
  },
): Promise<q.ErratumRow> {
  const number = await q.takeErratumNumber(tx, project.id);
  const row = await q.insertErratum(tx, {
    ...stored(fields),
    projectId: project.id,
    number,
    createdBy: author.id,
    reportedById: options.reportedById ?? null,
  });
  const revisionFields = toRevisionFields(fields);
  await revisionQueries.insertRevision(tx, {
    subject: 'erratum',
    subjectId: row.id,
    projectId: project.id,
    number: 1,
    parentNumber: null,
    authorId: author.id,
    creditedUserId: options.reportedById ?? null,
    proposalId: options.proposalId ?? null,
    message: options.message || `Recorded ${code(number)}`,
    fields: revisionFields,
    contentHash: contentHash(revisionFields),
    origin: options.origin ?? 'create',
  });
  await q.setErratumTags(tx, row.id, options.tagIds);
  await syncUploadRefs(tx, 'erratum', row.id, project.id, textsOf(row));
  await touchProject(tx, project.id);
  return row;
}

export async function createErratum(
  ctx: AppContext,
  user: AuthUser,
  project: ProjectRow,
  role: ProjectRole | null,
  input: Omit<Required<CreateErratum>, keyof ErratumFields> & { tags: string[]; message: string },
  fields: ErratumFields,
): Promise<ErratumDetail> {
  await checkAgainstProject(ctx, project, fields);
  const row = await withNotifications(ctx, async (tx, collect) => {
    const tagIds = await resolveTagIds(tx, user, input.tags);
    const created = await insertErratumWithRevision(tx, project, user, fields, { tagIds, message: input.message });
    collect(await notifyNewErratum(tx, project, user, created));
    return created;
  });
  return erratumDetail(ctx, project, role, user, row);
}

export function erratumStore(project: ProjectRow, row: q.ErratumRow): VersionedStore<ErratumRevisionFields> {
  return {
    subject: 'erratum',
    subjectId: row.id,
    projectId: project.id,
    textFields: ERRATUM_TEXT_FIELDS,
    async loadCurrent(tx: Tx) {
      const current = await q.lockErratum(tx, row.id);
      if (!current || current.hiddenAt) throw fail.notFound(`Erratum ${code(row.number)}`);
      return { revision: current.currentRevision, fields: toRevisionFields(fieldsOfRow(current)) };
    },
    // Every save (edits, restores, accepted proposals) updates the erratum's upload references.
    async write(tx, expected, fields) {
      if (!(await q.writeErratum(tx, row.id, expected, stored(fromRevisionFields(fields))))) return false;
      await syncUploadRefs(tx, 'erratum', row.id, project.id, textsOf(fields));
      return true;
    },
    toRow: (fields) => ({ fields }),
    fromRow: (stored) => stored.fields as ErratumRevisionFields,
  };
}

export async function saveErratum(
  ctx: AppContext,
  user: AuthUser,
  project: ProjectRow,
  role: ProjectRole | null,
  number: number,
  fields: ErratumFields,
  options: {
    baseRevision: number;
    message: string;
    tags?: string[];
    origin?: 'edit' | 'restore' | 'proposal';
    credit?: { userId: number; proposalId: number };
  },
): Promise<ErratumSaveResult> {
  const row = await load(ctx, project, number);
  await checkAgainstProject(ctx, project, fields);
  const result = await saveVersioned(
    ctx.db,
    erratumStore(project, row),
    {
      authorId: user.id,
      baseRevision: options.baseRevision,
      fields: toRevisionFields(fields),
      message: options.message,
      origin: options.credit ? 'proposal' : (options.origin ?? 'edit'),
      creditedUserId: options.credit?.userId ?? null,
      proposalId: options.credit?.proposalId ?? null,
    },
    // Tags change in the same transaction as the revision they were saved with.
    async (tx) => {
      if (options.tags)
        await q.setErratumTags(
          tx,
          row.id,
          await resolveTagIds(tx, user, options.tags, await currentTagIds(tx, 'erratum', row.id)),
        );
      await touchProject(tx, project.id);
    },
  );
  if (options.tags && result.outcome === 'unchanged') {
    // No new revision, but the tags may still have changed: their own small transaction.
    await ctx.db.transaction(async (tx) => {
      await q.setErratumTags(
        tx,
        row.id,
        await resolveTagIds(tx, user, options.tags!, await currentTagIds(tx, 'erratum', row.id)),
      );
      await touchProject(tx, project.id);
    });
  }
  return {
    outcome: result.outcome,
    mergedWith: result.mergedWith,
    erratum: await erratumDetail(ctx, project, role, user, await load(ctx, project, number)),
  };
}

export async function erratumRevisions(
  ctx: AppContext,
  project: ProjectRow,
  number: number,
  reader?: Reader,
): Promise<RevisionList> {
  const row = await load(ctx, project, number, reader);
  const rows = await revisionQueries.listRevisions(ctx.db, 'erratum', row.id);
  return { items: rows.map(toRevisionSummary) };
}

/** A revision with its fields in the API's form (board revisions as ids). */
export async function erratumRevision(
  ctx: AppContext,
  project: ProjectRow,
  number: number,
  revision: number,
  reader?: Reader,
): Promise<RevisionDetail> {
  const row = await load(ctx, project, number, reader);
  const found = await revisionQueries.findRevision(ctx.db, 'erratum', row.id, revision);
  if (!found) throw fail.notFound(`Revision ${revision} of ${code(number)}`);
  const detail = toRevisionDetail(found);
  return {
    ...detail,
    fields: fromRevisionFields(found.fields as ErratumRevisionFields) as unknown as Record<string, unknown>,
  };
}

export async function restoreErratumRevision(
  ctx: AppContext,
  user: AuthUser,
  project: ProjectRow,
  role: ProjectRole | null,
  number: number,
  revision: number,
  baseRevision: number,
  message: string,
): Promise<ErratumSaveResult> {
  const row = await load(ctx, project, number);
  const found = await revisionQueries.findRevision(ctx.db, 'erratum', row.id, revision);
  if (!found) throw fail.notFound(`Revision ${revision} of ${code(number)}`);
  return saveErratum(ctx, user, project, role, number, fromRevisionFields(found.fields as ErratumRevisionFields), {
    baseRevision,
    message: message || `Restored revision ${revision}`,
    origin: 'restore',
  });
}

/** The project's errata as Markdown for its repository (optionally only those affecting a board). */
export async function errataMarkdown(ctx: AppContext, project: ProjectRow, boardId?: number): Promise<string> {
  const list = await listProjectErrata(ctx, project, null, null);
  const board = boardId === undefined ? undefined : list.boards.find((b) => b.id === boardId);
  if (boardId !== undefined && !board) throw fail.notFound('That board revision');
  const items = board ? list.items.filter((e) => e.affected.some((a) => a.id === board.id)) : list.items;
  const lines: string[] = [
    `# Errata${board ? ` for ${board.label}` : ''} — ${project.title}`,
    '',
    `Exported from Reworkbook (${new Date().toISOString().slice(0, 10)}). Board revisions: ${list.boards.map((b) => b.label).join(', ') || 'none'}.`,
    '',
  ];
  if (!items.length) lines.push('No errata recorded.', '');
  for (const e of items) {
    const where = [e.refdes.join(', '), e.parts.join(', '), e.pins.length ? `pins ${e.pins.join(', ')}` : '']
      .filter(Boolean)
      .join(' · ');
    lines.push(
      `## ${e.code} — ${e.title}`,
      '',
      `- Severity: ${severityLabels[e.severity]}`,
      `- Status: ${erratumStatusLabels[e.status]}`,
      `- Category: ${e.category.name}`,
      `- Affects: ${e.affected.map((a) => a.label).join(', ') || '—'}${e.fixedIn ? ` · fixed in ${e.fixedIn.label}` : ''}`,
      ...(where ? [`- Where: ${where}`] : []),
      ...(e.reportedBy || e.reportedByText
        ? [
            `- Reported by: ${e.reportedBy ? `${e.reportedBy.displayName} (@${e.reportedBy.handle})` : e.reportedByText}`,
          ]
        : []),
      '',
    );
    for (const [label, text] of [
      ['Symptom', e.symptom],
      ['Cause', e.cause],
      ['Workaround', e.workaround],
      ['Fix', e.fix],
    ] as const) {
      if (text.trim()) lines.push(`### ${label}`, '', text.trim(), '');
    }
  }
  return `${lines.join('\n').trimEnd()}\n`;
}
