import { and, asc, count, desc, eq, inArray, isNotNull, isNull, lt, max, sql } from 'drizzle-orm';
import type { DbOrTx } from '../../db/client';
import { boardRevisions, documents, projectMembers, projects, users } from '../../db/schema';
import type { ProjectRole } from '../../shared/domain';

export type ProjectRow = typeof projects.$inferSelect;

/** A live (not deleted) project by slug. */
export async function findProjectBySlug(db: DbOrTx, slug: string): Promise<ProjectRow | undefined> {
  const [row] = await db
    .select()
    .from(projects)
    .where(and(eq(projects.slug, slug), isNull(projects.deletedAt)));
  return row;
}

export async function findProjectById(db: DbOrTx, id: number): Promise<ProjectRow | undefined> {
  const [row] = await db.select().from(projects).where(eq(projects.id, id));
  return row;
}

/** The row, locked until the transaction ends: concurrent metadata saves queue here. */
export async function lockProject(db: DbOrTx, id: number): Promise<ProjectRow | undefined> {
  const [row] = await db.select().from(projects).where(eq(projects.id, id)).for('update');
  return row;
}

export async function slugTaken(db: DbOrTx, slug: string): Promise<boolean> {
  const [row] = await db.select({ id: projects.id }).from(projects).where(eq(projects.slug, slug));
  return row !== undefined;
}

export async function memberRole(db: DbOrTx, projectId: number, userId: number): Promise<ProjectRole | null> {
  const [row] = await db
    .select({ role: projectMembers.role })
    .from(projectMembers)
    .where(and(eq(projectMembers.projectId, projectId), eq(projectMembers.userId, userId)));
  return row?.role ?? null;
}

const ownerColumns = {
  ownerId: users.id,
  ownerHandle: users.handle,
  ownerName: users.displayName,
  ownerAvatar: users.avatarUrl,
};

const cardColumns = {
  id: projects.id,
  slug: projects.slug,
  title: projects.title,
  summary: projects.summary,
  status: projects.status,
  hazards: projects.hazards,
  updatedAt: projects.updatedAt,
  publishedAt: projects.publishedAt,
  ...ownerColumns,
};

export type CardRow = Awaited<ReturnType<typeof listPublished>>['rows'][number];

/** Published, visible projects, most recently updated first. */
export async function listPublished(db: DbOrTx, limit: number, offset: number) {
  const where = and(eq(projects.status, 'published'), isNull(projects.deletedAt), isNull(projects.hiddenAt));
  const rows = await db
    .select({ ...cardColumns, myRole: sql<ProjectRole | null>`null` })
    .from(projects)
    .innerJoin(users, eq(users.id, projects.ownerId))
    .where(where)
    .orderBy(desc(projects.updatedAt), desc(projects.id))
    .limit(limit)
    .offset(offset);
  const [total] = await db.select({ n: count() }).from(projects).where(where);
  return { rows, total: total?.n ?? 0 };
}

/** Every live project the member owns or edits, drafts included. */
export async function listMemberProjects(db: DbOrTx, userId: number) {
  return db
    .select({ ...cardColumns, myRole: projectMembers.role })
    .from(projectMembers)
    .innerJoin(projects, eq(projects.id, projectMembers.projectId))
    .innerJoin(users, eq(users.id, projects.ownerId))
    .where(and(eq(projectMembers.userId, userId), isNull(projects.deletedAt)))
    .orderBy(desc(projects.updatedAt), desc(projects.id));
}

export async function insertProject(db: DbOrTx, values: typeof projects.$inferInsert): Promise<ProjectRow> {
  const [row] = await db.insert(projects).values(values).returning();
  if (!row) throw new Error('insert into projects returned no row');
  return row;
}

export async function addMember(db: DbOrTx, projectId: number, userId: number, role: ProjectRole) {
  await db.insert(projectMembers).values({ projectId, userId, role }).onConflictDoNothing();
}

export async function removeMember(db: DbOrTx, projectId: number, userId: number): Promise<boolean> {
  const removed = await db
    .delete(projectMembers)
    .where(and(eq(projectMembers.projectId, projectId), eq(projectMembers.userId, userId), eq(projectMembers.role, 'editor')))
    .returning({ userId: projectMembers.userId });
  return removed.length > 0;
}

export async function listMembers(db: DbOrTx, projectId: number) {
  return db
    .select({
      id: users.id,
      handle: users.handle,
      displayName: users.displayName,
      avatarUrl: users.avatarUrl,
      role: projectMembers.role,
    })
    .from(projectMembers)
    .innerJoin(users, eq(users.id, projectMembers.userId))
    .where(eq(projectMembers.projectId, projectId))
    .orderBy(asc(projectMembers.role), asc(projectMembers.addedAt));
}

export async function findOwner(db: DbOrTx, ownerId: number) {
  const [row] = await db
    .select({ id: users.id, handle: users.handle, displayName: users.displayName, avatarUrl: users.avatarUrl })
    .from(users)
    .where(eq(users.id, ownerId));
  return row;
}

/** Conditional metadata update: only when the project is still at `expected`. */
export async function writeProjectMeta(
  db: DbOrTx,
  projectId: number,
  expected: number,
  fields: { title: string; summary: string; licence: string; licenceOther: string; repoUrl: string; hazards: string[] },
): Promise<boolean> {
  const updated = await db
    .update(projects)
    .set({
      title: fields.title,
      summary: fields.summary,
      licence: fields.licence,
      licenceOther: fields.licenceOther || null,
      repoUrl: fields.repoUrl || null,
      hazards: fields.hazards,
      currentRevision: sql`${projects.currentRevision} + 1`,
      ...bump(),
    })
    .where(and(eq(projects.id, projectId), eq(projects.currentRevision, expected)))
    .returning({ id: projects.id });
  return updated.length === 1;
}

/** Something on the project's page changed: readers' caches must not serve the old page. */
const bump = () => ({ updatedAt: new Date(), changeSeq: sql`${projects.changeSeq} + 1` });

export async function touchProject(db: DbOrTx, projectId: number) {
  await db.update(projects).set(bump()).where(eq(projects.id, projectId));
}

export async function setStatus(db: DbOrTx, projectId: number, status: 'draft' | 'published') {
  await db
    .update(projects)
    .set({
      status,
      ...bump(),
      ...(status === 'published' ? { publishedAt: sql`coalesce(${projects.publishedAt}, now())` } : {}),
    })
    .where(eq(projects.id, projectId));
}

export async function softDeleteProject(db: DbOrTx, projectId: number, by: number) {
  await db.update(projects).set({ deletedAt: new Date(), deletedBy: by, ...bump() }).where(eq(projects.id, projectId));
}

export async function findDeletedProject(db: DbOrTx, slug: string): Promise<ProjectRow | undefined> {
  const [row] = await db
    .select()
    .from(projects)
    .where(and(eq(projects.slug, slug), isNotNull(projects.deletedAt)));
  return row;
}

export async function undeleteProject(db: DbOrTx, projectId: number) {
  await db.update(projects).set({ deletedAt: null, deletedBy: null, ...bump() }).where(eq(projects.id, projectId));
}

export async function listDeleted(db: DbOrTx) {
  return db
    .select({ slug: projects.slug, title: projects.title, deletedAt: projects.deletedAt, ...ownerColumns })
    .from(projects)
    .innerJoin(users, eq(users.id, projects.ownerId))
    .where(isNotNull(projects.deletedAt))
    .orderBy(desc(projects.deletedAt));
}

/** Hard delete of projects deleted before `cutoff` (cascades to everything they own). */
export async function purgeDeletedBefore(db: DbOrTx, cutoff: Date): Promise<string[]> {
  const purged = await db
    .delete(projects)
    .where(and(isNotNull(projects.deletedAt), lt(projects.deletedAt, cutoff)))
    .returning({ slug: projects.slug });
  return purged.map((p) => p.slug);
}

// --- board revisions -----------------------------------------------------------------------

export async function listBoardRevisions(db: DbOrTx, projectId: number) {
  return db
    .select()
    .from(boardRevisions)
    .where(eq(boardRevisions.projectId, projectId))
    .orderBy(asc(boardRevisions.position), asc(boardRevisions.id));
}

export async function nextBoardPosition(db: DbOrTx, projectId: number): Promise<number> {
  const [row] = await db
    .select({ p: max(boardRevisions.position) })
    .from(boardRevisions)
    .where(eq(boardRevisions.projectId, projectId));
  return (row?.p ?? -1) + 1;
}

export async function insertBoardRevision(db: DbOrTx, values: typeof boardRevisions.$inferInsert) {
  const [row] = await db.insert(boardRevisions).values(values).returning();
  return row!;
}

export async function updateBoardRevision(
  db: DbOrTx,
  projectId: number,
  id: number,
  values: { label: string; releasedOn: string | null; notes: string },
) {
  const [row] = await db
    .update(boardRevisions)
    .set(values)
    .where(and(eq(boardRevisions.projectId, projectId), eq(boardRevisions.id, id)))
    .returning();
  return row;
}

export async function deleteBoardRevision(db: DbOrTx, projectId: number, id: number): Promise<boolean> {
  const removed = await db
    .delete(boardRevisions)
    .where(and(eq(boardRevisions.projectId, projectId), eq(boardRevisions.id, id)))
    .returning({ id: boardRevisions.id });
  return removed.length > 0;
}

// --- documents as listed on the project page ----------------------------------------------

export async function listLiveDocuments(db: DbOrTx, projectId: number) {
  return db
    .select()
    .from(documents)
    .where(and(eq(documents.projectId, projectId), isNull(documents.deletedAt)))
    .orderBy(asc(documents.position), desc(documents.loggedOn), desc(documents.id));
}

export async function sectionIds(db: DbOrTx, projectId: number): Promise<number[]> {
  const rows = await db
    .select({ id: documents.id })
    .from(documents)
    .where(and(eq(documents.projectId, projectId), eq(documents.kind, 'section'), isNull(documents.deletedAt)));
  return rows.map((r) => r.id);
}

export async function setSectionPositions(db: DbOrTx, projectId: number, ids: number[]) {
  for (const [position, id] of ids.entries()) {
    await db
      .update(documents)
      .set({ position })
      .where(and(eq(documents.projectId, projectId), eq(documents.id, id), inArray(documents.kind, ['section'])));
  }
}
