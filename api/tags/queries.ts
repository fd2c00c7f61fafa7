/**
 * Queries of tag pages, the tag index and curation. Counts and items only ever include content
 * the viewer could read on its project page (the rule of `canRead` in api/projects/access.ts):
 * live projects that are published and not hidden, or of which the viewer is a member, or any
 * live project for an admin; hidden lessons and errata never.
 */
import { and, asc, desc, eq, inArray, sql, type SQL } from 'drizzle-orm';
import type { DbOrTx } from '../../db/client';
import { auditLog, tagAliases, tags, users } from '../../db/schema';

export type TagRow = typeof tags.$inferSelect;

/** Who is looking: decides which projects' content counts. */
export interface TagViewer {
  userId: number | null;
  admin: boolean;
}

export const ANONYMOUS_VIEWER: TagViewer = { userId: null, admin: false };

/** The link tables, by the kind of content they tag. */
export const linkTables = {
  lessons: { table: 'lesson_tags', subject: 'lesson_id' },
  errata: { table: 'erratum_tags', subject: 'erratum_id' },
  projects: { table: 'project_tags', subject: 'project_id' },
} as const;
export type LinkKind = keyof typeof linkTables;
export const linkKinds = Object.keys(linkTables) as LinkKind[];

/** SQL condition on a `projects` row aliased `p`: the viewer may read it. */
export function projectReadable(viewer: TagViewer): SQL {
  const member = viewer.userId
    ? sql`EXISTS (SELECT 1 FROM project_members pm WHERE pm.project_id = p.id AND pm.user_id = ${viewer.userId})`
    : sql`false`;
  return sql`(p.deleted_at IS NULL AND (${viewer.admin ? sql`true` : sql`false`} OR (p.status = 'published' AND p.hidden_at IS NULL) OR ${member}))`;
}

/** Lowercased `q` as an ILIKE pattern (wildcards escaped). */
function likePattern(q: string): string {
  return `%${q.toLowerCase().replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
}

export async function findTagBySlug(db: DbOrTx, slug: string): Promise<TagRow | undefined> {
  const [row] = await db.select().from(tags).where(eq(tags.slug, slug));
  return row;
}

export async function findTagById(db: DbOrTx, id: number): Promise<TagRow | undefined> {
  const [row] = await db.select().from(tags).where(eq(tags.id, id));
  return row;
}

export async function findAliasTarget(db: DbOrTx, alias: string): Promise<TagRow | undefined> {
  const [row] = await db
    .select({ tag: tags })
    .from(tagAliases)
    .innerJoin(tags, eq(tags.id, tagAliases.tagId))
    .where(eq(tagAliases.alias, alias));
  return row?.tag;
}

/** Follows merges to the surviving tag (bounded: a chain longer than 10 is a data error). */
export async function followMerges(db: DbOrTx, tag: TagRow): Promise<TagRow> {
  let current = tag;
  for (let hops = 0; current.mergedIntoId && hops < 10; hops++) {
    const next = await findTagById(db, current.mergedIntoId);
    if (!next) break;
    current = next;
  }
  return current;
}

/** Locks tag rows for a curation action, in id order (the tagging path locks in the same order). */
export async function lockTags(db: DbOrTx, ids: number[]): Promise<Map<number, TagRow>> {
  const rows = await db
    .select()
    .from(tags)
    .where(inArray(tags.id, [...new Set(ids)]))
    .orderBy(asc(tags.id))
    .for('update');
  return new Map(rows.map((r) => [r.id, r]));
}

export async function aliasesOf(db: DbOrTx, tagIds: number[]): Promise<Map<number, string[]>> {
  const map = new Map<number, string[]>();
  if (!tagIds.length) return map;
  const rows = await db
    .select({ tagId: tagAliases.tagId, alias: tagAliases.alias })
    .from(tagAliases)
    .where(inArray(tagAliases.tagId, tagIds))
    .orderBy(asc(tagAliases.alias));
  for (const r of rows) map.set(r.tagId, [...(map.get(r.tagId) ?? []), r.alias]);
  return map;
}

export async function slugOrAliasTaken(
  db: DbOrTx,
  slug: string,
): Promise<{ tagId: number; as: 'slug' | 'alias' } | null> {
  const [asSlug] = await db.select({ id: tags.id }).from(tags).where(eq(tags.slug, slug));
  if (asSlug) return { tagId: asSlug.id, as: 'slug' };
  const [asAlias] = await db.select({ id: tagAliases.tagId }).from(tagAliases).where(eq(tagAliases.alias, slug));
  return asAlias ? { tagId: asAlias.id, as: 'alias' } : null;
}

export interface CountRow {
  id: number;
  lessons: number;
  errata: number;
  projects: number;
}

/** Visible uses per kind of each tag (all live tags when `ids` is omitted). */
export async function countsByTag(db: DbOrTx, viewer: TagViewer, ids?: number[]): Promise<Map<number, CountRow>> {
  const readable = projectReadable(viewer);
  const only = ids
    ? ids.length
      ? sql`t.id IN (${sql.join(
          ids.map((id) => sql`${id}`),
          sql`, `,
        )})`
      : sql`false`
    : sql`true`;
  const result = await db.execute<{ id: number; lessons: string; errata: string; projects: string }>(sql`
    SELECT t.id,
      (SELECT count(*) FROM lesson_tags x JOIN lessons l ON l.id = x.lesson_id JOIN projects p ON p.id = l.project_id
        WHERE x.tag_id = t.id AND l.hidden_at IS NULL AND ${readable}) AS lessons,
      (SELECT count(*) FROM erratum_tags x JOIN errata e ON e.id = x.erratum_id JOIN projects p ON p.id = e.project_id
        WHERE x.tag_id = t.id AND e.hidden_at IS NULL AND ${readable}) AS errata,
      (SELECT count(*) FROM project_tags x JOIN projects p ON p.id = x.project_id
        WHERE x.tag_id = t.id AND ${readable}) AS projects
    FROM tags t WHERE ${only}`);
  return new Map(
    result.rows.map((r) => [
      Number(r.id),
      { id: Number(r.id), lessons: Number(r.lessons), errata: Number(r.errata), projects: Number(r.projects) },
    ]),
  );
}

/** Live (not merged) tags for the index, filtered by text over name, slug and aliases. */
export async function listLiveTags(
  db: DbOrTx,
  options: { q: string; states: TagRow['state'][]; pendingOf: number | null; allPending: boolean },
): Promise<TagRow[]> {
  const stateCond = sql.join(
    options.states.map((s) =>
      s === 'pending' && !options.allPending
        ? options.pendingOf
          ? sql`(${tags.state} = 'pending' AND ${tags.createdBy} = ${options.pendingOf})`
          : sql`false`
        : sql`${tags.state} = ${s}`,
    ),
    sql` OR `,
  );
  const pattern = likePattern(options.q);
  const text = options.q
    ? sql`(lower(${tags.name}) LIKE ${pattern} OR ${tags.slug} LIKE ${pattern} OR EXISTS (SELECT 1 FROM tag_aliases a WHERE a.tag_id = ${tags.id} AND a.alias LIKE ${pattern}))`
    : sql`true`;
  return db
    .select()
    .from(tags)
    .where(and(sql`${tags.mergedIntoId} IS NULL`, sql`(${stateCond})`, text))
    .orderBy(asc(tags.name))
    .limit(1000);
}

export async function mergedInto(db: DbOrTx, tagId: number) {
  return db
    .select({ slug: tags.slug, name: tags.name })
    .from(tags)
    .where(eq(tags.mergedIntoId, tagId))
    .orderBy(asc(tags.name));
}

export type LessonItemRow = {
  id: number;
  body: string;
  project_slug: string;
  project_title: string;
  via_slug: string | null;
  updated_at: Date;
  created_at: Date;
};
export type ErratumItemRow = {
  number: number;
  title: string;
  severity: string;
  status: string;
  project_slug: string;
  project_title: string;
  via_slug: string | null;
  updated_at: Date;
  created_at: Date;
  symptom: string;
};
export type ProjectItemRow = {
  slug: string;
  title: string;
  summary: string;
  status: string;
  via_slug: string | null;
  updated_at: Date;
  created_at: Date;
};

/** The newest visible lessons, errata and projects carrying a tag. */
export async function itemsOfTag(db: DbOrTx, viewer: TagViewer, tagId: number, limit: number) {
  const readable = projectReadable(viewer);
  const via = sql`(SELECT o.slug FROM tags o WHERE o.id = x.original_tag_id AND o.id <> x.tag_id)`;
  const [lessonRows, errataRows, projectRows] = await Promise.all([
    db.execute<LessonItemRow>(sql`
      SELECT l.id, l.body, l.updated_at, l.created_at, p.slug AS project_slug, p.title AS project_title, ${via} AS via_slug
      FROM lesson_tags x JOIN lessons l ON l.id = x.lesson_id JOIN projects p ON p.id = l.project_id
      WHERE x.tag_id = ${tagId} AND l.hidden_at IS NULL AND ${readable}
      ORDER BY l.updated_at DESC, l.id DESC LIMIT ${limit}`),
    db.execute<ErratumItemRow>(sql`
      SELECT e.number, e.title, e.severity, e.status, e.symptom, e.updated_at, e.created_at, p.slug AS project_slug,
        p.title AS project_title, ${via} AS via_slug
      FROM erratum_tags x JOIN errata e ON e.id = x.erratum_id JOIN projects p ON p.id = e.project_id
      WHERE x.tag_id = ${tagId} AND e.hidden_at IS NULL AND ${readable}
      ORDER BY e.updated_at DESC, e.id DESC LIMIT ${limit}`),
    db.execute<ProjectItemRow>(sql`
      SELECT p.slug, p.title, p.summary, p.status, p.updated_at, p.created_at, ${via} AS via_slug
      FROM project_tags x JOIN projects p ON p.id = x.project_id
      WHERE x.tag_id = ${tagId} AND ${readable}
      ORDER BY p.updated_at DESC, p.id DESC LIMIT ${limit}`),
  ]);
  return { lessons: lessonRows.rows, errata: errataRows.rows, projects: projectRows.rows };
}

export async function auditOfTag(db: DbOrTx, tagId: number) {
  return db
    .select({
      id: auditLog.id,
      action: auditLog.action,
      before: auditLog.before,
      after: auditLog.after,
      reason: auditLog.reason,
      at: auditLog.at,
      handle: users.handle,
      displayName: users.displayName,
    })
    .from(auditLog)
    .leftJoin(users, eq(users.id, auditLog.actorId))
    .where(and(eq(auditLog.targetKind, 'tag'), eq(auditLog.targetId, String(tagId))))
    .orderBy(desc(auditLog.at), desc(auditLog.id));
}

/** The newest merge (or reject with replacement) of a tag: what an unmerge undoes. */
export async function lastMergeEntry(db: DbOrTx, tagId: number) {
  const [row] = await db
    .select({ after: auditLog.after })
    .from(auditLog)
    .where(
      and(
        eq(auditLog.targetKind, 'tag'),
        eq(auditLog.targetId, String(tagId)),
        inArray(auditLog.action, ['tag.merge', 'tag.reject']),
        sql`${auditLog.after} ? 'into'`,
      ),
    )
    .orderBy(desc(auditLog.id))
    .limit(1);
  return row?.after as MergeRecord | undefined;
}

/** What a merge stores in its audit entry's `after`, so an unmerge can put everything back. */
export interface MergeRecord {
  into: string;
  intoId: number;
  aliasAdded: boolean;
  moved: Record<LinkKind, number[]>;
  /** Content that carried both tags: its link to the merged tag was dropped, remembered here. */
  collapsed: Record<LinkKind, Array<{ subjectId: number; originalTagId: number | null }>>;
}

/** Moves every use of `fromId` to `intoId`; a subject that already carries `intoId` keeps one link. */
export async function moveLinks(db: DbOrTx, fromId: number, intoId: number) {
  const moved = {} as MergeRecord['moved'];
  const collapsed = {} as MergeRecord['collapsed'];
  for (const kind of linkKinds) {
    const { table, subject } = linkTables[kind];
    const t = sql.raw(table);
    const s = sql.raw(subject);
    const dropped = await db.execute<{ subject_id: number; original_tag_id: number | null }>(sql`
      DELETE FROM ${t} a WHERE a.tag_id = ${fromId}
        AND EXISTS (SELECT 1 FROM ${t} b WHERE b.${s} = a.${s} AND b.tag_id = ${intoId})
      RETURNING a.${s} AS subject_id, a.original_tag_id`);
    const updated = await db.execute<{ subject_id: number }>(sql`
      UPDATE ${t} SET tag_id = ${intoId}, original_tag_id = coalesce(original_tag_id, ${fromId})
      WHERE tag_id = ${fromId} RETURNING ${s} AS subject_id`);
    collapsed[kind] = dropped.rows.map((r) => ({ subjectId: Number(r.subject_id), originalTagId: r.original_tag_id }));
    moved[kind] = updated.rows.map((r) => Number(r.subject_id)).sort((a, b) => a - b);
  }
  return { moved, collapsed };
}

/**
 * Gives `tagId` back its uses from `fromId`: links first applied as `tagId` (or as a tag merged
 * into it) return to it, and the links a merge dropped are restored.
 */
export async function restoreLinks(db: DbOrTx, tagId: number, fromId: number, record: MergeRecord | undefined) {
  const family = await db.execute<{ id: number }>(sql`
    WITH RECURSIVE f(id) AS (SELECT ${tagId}::int UNION SELECT t.id FROM tags t JOIN f ON t.merged_into_id = f.id)
    SELECT id FROM f`);
  const ids = family.rows.map((r) => Number(r.id));
  const idList = sql.join(
    ids.map((id) => sql`${id}`),
    sql`, `,
  );
  const restored = {} as MergeRecord['moved'];
  for (const kind of linkKinds) {
    const { table, subject } = linkTables[kind];
    const t = sql.raw(table);
    const s = sql.raw(subject);
    const updated = await db.execute<{ subject_id: number }>(sql`
      UPDATE ${t} a SET tag_id = ${tagId}
      WHERE a.tag_id = ${fromId} AND a.original_tag_id IN (${idList})
        AND NOT EXISTS (SELECT 1 FROM ${t} b WHERE b.${s} = a.${s} AND b.tag_id = ${tagId})
      RETURNING a.${s} AS subject_id`);
    const back = new Set(updated.rows.map((r) => Number(r.subject_id)));
    for (const c of record?.collapsed[kind] ?? []) {
      const inserted = await db.execute<{ subject_id: number }>(sql`
        INSERT INTO ${t} (${s}, tag_id, original_tag_id)
        SELECT ${c.subjectId}, ${tagId}, ${c.originalTagId ?? tagId}
        WHERE EXISTS (SELECT 1 FROM ${sql.raw(kind === 'lessons' ? 'lessons' : kind === 'errata' ? 'errata' : 'projects')} WHERE id = ${c.subjectId})
        ON CONFLICT DO NOTHING RETURNING ${s} AS subject_id`);
      for (const r of inserted.rows) back.add(Number(r.subject_id));
    }
    restored[kind] = [...back].sort((a, b) => a - b);
  }
  return restored;
}

/** Every use of a tag, by kind (for the audit entry of a removal). */
export async function usesOf(db: DbOrTx, tagId: number): Promise<Record<LinkKind, number[]>> {
  const uses = {} as Record<LinkKind, number[]>;
  for (const kind of linkKinds) {
    const { table, subject } = linkTables[kind];
    const rows = await db.execute<{ id: number }>(
      sql`SELECT ${sql.raw(subject)} AS id FROM ${sql.raw(table)} WHERE tag_id = ${tagId} ORDER BY 1`,
    );
    uses[kind] = rows.rows.map((r) => Number(r.id));
  }
  return uses;
}

/**
 * The search index follows curation: lesson and erratum links have triggers, project links do
 * not, so the projects whose tags changed are queued here (same transaction).
 */
export async function enqueueProjects(db: DbOrTx, projectIds: number[]) {
  for (const id of new Set(projectIds)) {
    await db.execute(sql`INSERT INTO search_outbox (kind, ref_id) VALUES ('project', ${id})`);
  }
}
