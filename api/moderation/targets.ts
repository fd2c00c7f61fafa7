/**
 * The content a flag points at, loaded in context (title, excerpt, project, author, client
 * link) for every kind of target, and the one place that sets or clears `hidden_at` on it.
 */
import { and, eq, inArray, isNull, sql } from 'drizzle-orm';
import type { DbOrTx } from '../../db/client';
import { comments, documents, errata, lessons, projects, proposals, uploads, users } from '../../db/schema';
import type { FlagTargetKind, ModerationTarget, TargetLink } from '../../shared/contracts/moderation';
import type { ProjectStatus } from '../../shared/domain';
import { excerptOf } from '../comments/service';
import { hiddenOf } from './visibility';

export interface TargetRef {
  kind: FlagTargetKind;
  id: number;
}

/** A target with what access checks need besides what the contract shows. */
export interface LoadedTarget {
  ref: TargetRef;
  view: ModerationTarget;
  authorId: number | null;
  projectId: number | null;
  project: { id: number; ownerId: number; status: ProjectStatus; hiddenAt: Date | null; deletedAt: Date | null } | null;
  hiddenAt: Date | null;
  hiddenReason: string | null;
}

export const targetKey = (ref: TargetRef) => `${ref.kind}:${ref.id}`;

interface Row {
  id: number;
  title: string;
  text: string;
  authorId: number | null;
  projectId: number | null;
  hiddenAt: Date | null;
  hiddenReason: string | null;
  link: TargetLink | null;
}

const tables = {
  project: projects,
  document: documents,
  erratum: errata,
  lesson: lessons,
  comment: comments,
  proposal: proposals,
  upload: uploads,
} as const;

const code = (n: number) => `E${n}`;
const short = (text: string, max = 60) => excerptOf(text, max);

async function rowsOf(db: DbOrTx, kind: FlagTargetKind, ids: number[]): Promise<Row[]> {
  switch (kind) {
    case 'project': {
      const rows = await db.select().from(projects).where(inArray(projects.id, ids));
      return rows.map((p) => ({
        id: p.id,
        title: p.title,
        text: p.summary,
        authorId: p.ownerId,
        projectId: p.id,
        hiddenAt: p.hiddenAt,
        hiddenReason: p.hiddenReason,
        link: { name: 'project', params: { slug: p.slug } },
      }));
    }
    case 'document': {
      const rows = await db
        .select({ d: documents, slug: projects.slug })
        .from(documents)
        .innerJoin(projects, eq(projects.id, documents.projectId))
        .where(and(inArray(documents.id, ids), isNull(documents.deletedAt)));
      return rows.map(({ d, slug }) => ({
        id: d.id,
        title: d.title,
        text: d.body,
        authorId: d.createdBy,
        projectId: d.projectId,
        hiddenAt: d.hiddenAt,
        hiddenReason: d.hiddenReason,
        link:
          d.kind === 'log_entry'
            ? { name: 'log-entry', params: { slug, documentId: String(d.id) } }
            : { name: 'project', params: { slug }, hash: `section-${d.id}` },
      }));
    }
    case 'erratum': {
      const rows = await db
        .select({ e: errata, slug: projects.slug })
        .from(errata)
        .innerJoin(projects, eq(projects.id, errata.projectId))
        .where(inArray(errata.id, ids));
      return rows.map(({ e, slug }) => ({
        id: e.id,
        title: `${code(e.number)} ${e.title}`,
        text: e.symptom || e.cause,
        authorId: e.createdBy,
        projectId: e.projectId,
        hiddenAt: e.hiddenAt,
        hiddenReason: e.hiddenReason,
        link: { name: 'erratum', params: { slug, code: code(e.number) } },
      }));
    }
    case 'lesson': {
      const rows = await db
        .select({ l: lessons, slug: projects.slug })
        .from(lessons)
        .innerJoin(projects, eq(projects.id, lessons.projectId))
        .where(inArray(lessons.id, ids));
      return rows.map(({ l, slug }) => ({
        id: l.id,
        title: `Lesson: ${short(l.body)}`,
        text: l.body,
        authorId: l.createdBy,
        projectId: l.projectId,
        hiddenAt: l.hiddenAt,
        hiddenReason: l.hiddenReason,
        link: { name: 'project', params: { slug }, hash: `lesson-${l.id}` },
      }));
    }
    case 'comment': {
      const rows = await db
        .select({ c: comments, slug: projects.slug, handle: users.handle, erratumNumber: errata.number })
        .from(comments)
        .innerJoin(projects, eq(projects.id, comments.projectId))
        .innerJoin(users, eq(users.id, comments.authorId))
        .leftJoin(errata, eq(errata.id, comments.erratumId))
        .where(inArray(comments.id, ids));
      return rows.map(({ c, slug, handle, erratumNumber }) => ({
        id: c.id,
        title: `Comment by ${handle}`,
        text: c.body,
        authorId: c.authorId,
        projectId: c.projectId,
        hiddenAt: c.hiddenAt,
        hiddenReason: c.hiddenReason,
        link:
          c.proposalId !== null
            ? { name: 'proposal', params: { proposalId: String(c.proposalId) }, hash: `comment-${c.id}` }
            : erratumNumber !== null
              ? { name: 'erratum', params: { slug, code: code(erratumNumber) }, hash: `comment-${c.id}` }
              : null,
      }));
    }
    case 'proposal': {
      const labels = {
        new_erratum: 'Proposed erratum',
        erratum_edit: 'Proposed erratum edit',
        document_edit: 'Proposed edit',
      };
      const rows = await db.select().from(proposals).where(inArray(proposals.id, ids));
      return rows.map((p) => {
        const payload = (p.payload ?? {}) as { title?: unknown; symptom?: unknown; body?: unknown };
        const title = typeof payload.title === 'string' ? payload.title : '';
        const text = [p.message, payload.symptom, payload.body].find((v) => typeof v === 'string' && v.length > 0);
        return {
          id: p.id,
          title: title ? `${labels[p.kind]}: ${title}` : labels[p.kind],
          text: typeof text === 'string' ? text : '',
          authorId: p.authorId,
          projectId: p.projectId,
          hiddenAt: p.hiddenAt,
          hiddenReason: p.hiddenReason,
          link: { name: 'proposal', params: { proposalId: String(p.id) } },
        };
      });
    }
    case 'upload': {
      const rows = await db
        .select({ u: uploads, slug: projects.slug })
        .from(uploads)
        .leftJoin(projects, eq(projects.id, uploads.projectId))
        .where(inArray(uploads.id, ids));
      return rows.map(({ u, slug }) => ({
        id: u.id,
        title: u.originalName,
        text: u.caption || u.altText,
        authorId: u.ownerId,
        projectId: u.projectId,
        hiddenAt: u.hiddenAt,
        hiddenReason: u.hiddenReason,
        link: slug ? { name: 'project-gallery', params: { slug }, hash: `upload-${u.id}` } : null,
      }));
    }
  }
}

/** Loads the targets that still exist, keyed by `targetKey`. Deleted projects' content is gone. */
export async function loadTargets(db: DbOrTx, refs: TargetRef[]): Promise<Map<string, LoadedTarget>> {
  const byKind = new Map<FlagTargetKind, number[]>();
  for (const ref of refs) byKind.set(ref.kind, [...(byKind.get(ref.kind) ?? []), ref.id]);
  const found: { kind: FlagTargetKind; row: Row }[] = [];
  for (const [kind, ids] of byKind)
    for (const row of await rowsOf(db, kind, [...new Set(ids)])) found.push({ kind, row });

  const projectIds = [...new Set(found.map((f) => f.row.projectId).filter((id): id is number => id !== null))];
  const authorIds = [...new Set(found.map((f) => f.row.authorId).filter((id): id is number => id !== null))];
  const projectRows = projectIds.length
    ? await db
        .select({
          id: projects.id,
          slug: projects.slug,
          title: projects.title,
          ownerId: projects.ownerId,
          status: projects.status,
          hiddenAt: projects.hiddenAt,
          deletedAt: projects.deletedAt,
        })
        .from(projects)
        .where(inArray(projects.id, projectIds))
    : [];
  const authorRows = authorIds.length
    ? await db
        .select({ id: users.id, handle: users.handle, displayName: users.displayName, avatarUrl: users.avatarUrl })
        .from(users)
        .where(inArray(users.id, authorIds))
    : [];
  const projectById = new Map(projectRows.map((p) => [p.id, p]));
  const authorById = new Map(authorRows.map((u) => [u.id, u]));

  const out = new Map<string, LoadedTarget>();
  for (const { kind, row } of found) {
    const project = row.projectId !== null ? projectById.get(row.projectId) : undefined;
    if (project?.deletedAt) continue;
    const ref = { kind, id: row.id };
    out.set(targetKey(ref), {
      ref,
      authorId: row.authorId,
      projectId: row.projectId,
      project: project ?? null,
      hiddenAt: row.hiddenAt,
      hiddenReason: row.hiddenReason,
      view: {
        kind,
        id: row.id,
        title: row.title,
        excerpt: excerptOf(row.text, 300),
        project: project ? { slug: project.slug, title: project.title } : null,
        author: row.authorId !== null ? (authorById.get(row.authorId) ?? null) : null,
        link: row.link,
        hidden: hiddenOf(row),
      },
    });
  }
  return out;
}

export async function loadTarget(db: DbOrTx, ref: TargetRef): Promise<LoadedTarget | undefined> {
  return (await loadTargets(db, [ref])).get(targetKey(ref));
}

/** Locks the target's row until the transaction ends, so two moderators cannot both hide it. */
export async function lockTarget(db: DbOrTx, ref: TargetRef): Promise<{ hiddenAt: Date | null } | undefined> {
  const table = tables[ref.kind];
  const [row] = await db.select({ hiddenAt: table.hiddenAt }).from(table).where(eq(table.id, ref.id)).for('update');
  return row;
}

export async function setHidden(db: DbOrTx, ref: TargetRef, reason: string | null): Promise<void> {
  const table = tables[ref.kind];
  await db
    .update(table)
    .set(reason === null ? { hiddenAt: null, hiddenReason: null } : { hiddenAt: sql`now()`, hiddenReason: reason })
    .where(eq(table.id, ref.id));
}

/** Project pages are cached under `change_seq` (api/projects/service.ts): move it on. */
export async function bumpProjectPage(db: DbOrTx, projectId: number): Promise<void> {
  await db
    .update(projects)
    .set({ changeSeq: sql`${projects.changeSeq} + 1` })
    .where(eq(projects.id, projectId));
}
