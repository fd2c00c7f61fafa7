import { and, asc, count, eq, inArray, isNull, notInArray, sql } from 'drizzle-orm';
import type { DbOrTx } from '../../db/client';
import {
  boardRevisions,
  categories,
  comments,
  erratumTags,
  errata,
  lessonErrata,
  lessons,
  projects,
  users,
} from '../../db/schema';

export type ErratumRow = typeof errata.$inferSelect;

/** Visible errata of a project, in number order (`withHidden`: also those moderators hid). */
export async function listErrata(db: DbOrTx, projectId: number, withHidden = false): Promise<ErratumRow[]> {
  return db
    .select()
    .from(errata)
    .where(and(eq(errata.projectId, projectId), withHidden ? undefined : isNull(errata.hiddenAt)))
    .orderBy(asc(errata.number));
}

export async function findErratum(
  db: DbOrTx,
  projectId: number,
  number: number,
  withHidden = false,
): Promise<ErratumRow | undefined> {
  const [row] = await db
    .select()
    .from(errata)
    .where(
      and(eq(errata.projectId, projectId), eq(errata.number, number), withHidden ? undefined : isNull(errata.hiddenAt)),
    );
  return row;
}

/** The row, locked until the transaction ends: concurrent saves of one erratum queue here. */
export async function lockErratum(db: DbOrTx, id: number): Promise<ErratumRow | undefined> {
  const [row] = await db.select().from(errata).where(eq(errata.id, id)).for('update');
  return row;
}

export async function findErratumById(db: DbOrTx, id: number): Promise<ErratumRow | undefined> {
  const [row] = await db.select().from(errata).where(eq(errata.id, id));
  return row;
}

/** Takes the next erratum number of the project; numbers are never reused. */
export async function takeErratumNumber(db: DbOrTx, projectId: number): Promise<number> {
  const [row] = await db
    .update(projects)
    .set({ nextErratumNumber: sql`${projects.nextErratumNumber} + 1` })
    .where(eq(projects.id, projectId))
    .returning({ next: projects.nextErratumNumber });
  if (!row) throw new Error(`project ${projectId} vanished while numbering an erratum`);
  return row.next - 1;
}

export interface StoredErratumFields {
  title: string;
  categorySlug: string;
  severity: ErratumRow['severity'];
  status: ErratumRow['status'];
  affected: number[];
  fixedInId: number | null;
  refdes: string[];
  parts: string[];
  pins: string[];
  symptom: string;
  cause: string;
  workaround: string;
  fix: string;
  reportedByText: string | null;
}

export async function insertErratum(
  db: DbOrTx,
  values: StoredErratumFields & { projectId: number; number: number; createdBy: number; reportedById: number | null },
): Promise<ErratumRow> {
  const [row] = await db
    .insert(errata)
    .values({ ...values, currentRevision: 1 })
    .returning();
  if (!row) throw new Error('insert into errata returned no row');
  return row;
}

/** Conditional write: only when the erratum is still at `expected`. */
export async function writeErratum(
  db: DbOrTx,
  id: number,
  expected: number,
  values: StoredErratumFields,
): Promise<boolean> {
  const updated = await db
    .update(errata)
    .set({ ...values, currentRevision: sql`${errata.currentRevision} + 1`, updatedAt: new Date() })
    .where(and(eq(errata.id, id), eq(errata.currentRevision, expected)))
    .returning({ id: errata.id });
  return updated.length === 1;
}

/** Like the lessons' setTags: kept links keep their original tag, for an unmerge after a save. */
export async function setErratumTags(db: DbOrTx, erratumId: number, tagIds: number[]) {
  const wanted = [...new Set(tagIds)];
  await db
    .delete(erratumTags)
    .where(
      and(eq(erratumTags.subjectId, erratumId), wanted.length ? notInArray(erratumTags.tagId, wanted) : undefined),
    );
  if (wanted.length) {
    await db
      .insert(erratumTags)
      .values(wanted.map((tagId) => ({ subjectId: erratumId, tagId, originalTagId: tagId })))
      .onConflictDoNothing();
  }
}

export async function tagIdsOfErrata(db: DbOrTx, ids: number[]): Promise<Map<number, number[]>> {
  const map = new Map<number, number[]>();
  if (!ids.length) return map;
  const rows = await db
    .select({ erratumId: erratumTags.subjectId, tagId: erratumTags.tagId })
    .from(erratumTags)
    .where(inArray(erratumTags.subjectId, ids));
  for (const row of rows) map.set(row.erratumId, [...(map.get(row.erratumId) ?? []), row.tagId]);
  return map;
}

export async function commentCounts(db: DbOrTx, erratumIds: number[]): Promise<Map<number, number>> {
  if (!erratumIds.length) return new Map();
  const rows = await db
    .select({ id: comments.erratumId, n: count() })
    .from(comments)
    .where(and(inArray(comments.erratumId, erratumIds), isNull(comments.hiddenAt)))
    .groupBy(comments.erratumId);
  return new Map(rows.map((r) => [r.id!, r.n]));
}

export async function listCategories(db: DbOrTx) {
  return db
    .select({ slug: categories.slug, name: categories.name, description: categories.description })
    .from(categories)
    .orderBy(asc(categories.position), asc(categories.name));
}

export async function projectBoards(db: DbOrTx, projectId: number) {
  return db
    .select({ id: boardRevisions.id, label: boardRevisions.label, releasedOn: boardRevisions.releasedOn })
    .from(boardRevisions)
    .where(eq(boardRevisions.projectId, projectId))
    .orderBy(asc(boardRevisions.position), asc(boardRevisions.id));
}

export async function usersByIds(db: DbOrTx, ids: number[]) {
  if (!ids.length)
    return new Map<number, { id: number; handle: string; displayName: string; avatarUrl: string | null }>();
  const rows = await db
    .select({ id: users.id, handle: users.handle, displayName: users.displayName, avatarUrl: users.avatarUrl })
    .from(users)
    .where(inArray(users.id, ids));
  return new Map(rows.map((r) => [r.id, r]));
}

export async function lessonsOfErratum(db: DbOrTx, erratumId: number) {
  return db
    .select({ id: lessons.id, body: lessons.body, revision: lessons.currentRevision })
    .from(lessonErrata)
    .innerJoin(lessons, eq(lessons.id, lessonErrata.lessonId))
    .where(and(eq(lessonErrata.erratumId, erratumId), isNull(lessons.hiddenAt)))
    .orderBy(asc(lessons.id));
}

/** Numbers of the errata that name a board revision (affected or fixed in). */
export async function errataNamingBoard(db: DbOrTx, projectId: number, boardId: number): Promise<number[]> {
  const rows = await db
    .select({ number: errata.number })
    .from(errata)
    .where(
      and(
        eq(errata.projectId, projectId),
        sql`(${boardId} = ANY(${errata.affected}) OR ${errata.fixedInId} = ${boardId})`,
      ),
    )
    .orderBy(asc(errata.number));
  return rows.map((r) => r.number);
}
