/** Drizzle only: upload rows, their references, and the advisory locks that order file writes. */
import { and, asc, count, desc, eq, inArray, isNotNull, isNull, lt, ne, notExists, sql, sum } from 'drizzle-orm';
import type { DbOrTx, Tx } from '../../db/client';
import { projects, uploadRefs, uploads } from '../../db/schema';
import type { StoredVariant, UploadDetails, UploadRow } from './present';

// Advisory lock namespaces (the first key of pg_advisory_xact_lock(int, int)).
const LOCK_USER_QUOTA = 7301;
const LOCK_STORAGE_KEY = 7302;

/** One member's uploads are counted against the quota one transaction at a time. */
export async function lockQuota(tx: Tx, userId: number): Promise<void> {
  await tx.execute(sql`SELECT pg_advisory_xact_lock(${LOCK_USER_QUOTA}, ${userId})`);
}

/**
 * Writers of a storage key (an upload, the variants job) and its remover (the sweep, a delete)
 * take this lock, so a file is never removed between being written and its row committing.
 */
export async function lockStorageKey(tx: Tx, key: string): Promise<void> {
  await tx.execute(sql`SELECT pg_advisory_xact_lock(${LOCK_STORAGE_KEY}, hashtext(${key}))`);
}

/** What one member's uploads take: bytes of their stored originals, and how many there are. */
export async function usageOf(db: DbOrTx, userId: number): Promise<{ bytes: number; files: number }> {
  const [row] = await db
    .select({ total: sum(uploads.bytes), files: count() })
    .from(uploads)
    .where(eq(uploads.ownerId, userId));
  return { bytes: Number(row?.total ?? 0), files: row?.files ?? 0 };
}

export async function insertUpload(tx: Tx, values: typeof uploads.$inferInsert): Promise<UploadRow> {
  const [row] = await tx.insert(uploads).values(values).returning();
  if (!row) throw new Error('insert into uploads returned no row');
  return row;
}

export async function findUpload(db: DbOrTx, id: number): Promise<UploadRow | undefined> {
  const [row] = await db.select().from(uploads).where(eq(uploads.id, id));
  return row;
}

export async function lockUpload(tx: Tx, id: number): Promise<UploadRow | undefined> {
  const [row] = await tx.select().from(uploads).where(eq(uploads.id, id)).for('update');
  return row;
}

/** A project's uploads, newest first; `everything` adds those still processing or failed, and hidden ones. */
export async function listProjectUploads(db: DbOrTx, projectId: number, everything: boolean): Promise<UploadRow[]> {
  return db
    .select()
    .from(uploads)
    .where(
      and(
        eq(uploads.projectId, projectId),
        everything ? undefined : and(eq(uploads.state, 'ready'), isNull(uploads.hiddenAt)),
      ),
    )
    .orderBy(desc(uploads.createdAt), desc(uploads.id));
}

/** Which of these uploads some content uses. */
export async function referencedIds(db: DbOrTx, ids: number[]): Promise<Set<number>> {
  if (!ids.length) return new Set();
  const rows = await db.selectDistinct({ id: uploadRefs.uploadId }).from(uploadRefs).where(inArray(uploadRefs.uploadId, ids));
  return new Set(rows.map((r) => r.id));
}

export async function updateTexts(db: DbOrTx, id: number, values: { altText?: string; caption?: string }): Promise<UploadRow | undefined> {
  const [row] = await db.update(uploads).set(values).where(eq(uploads.id, id)).returning();
  return row;
}

export async function setProcessed(
  tx: Tx,
  id: number,
  values: { variants: StoredVariant[]; width: number; height: number; details: UploadDetails },
): Promise<void> {
  await tx
    .update(uploads)
    .set({ state: 'ready', variants: values.variants, width: values.width, height: values.height, details: values.details })
    .where(eq(uploads.id, id));
}

export async function setFailed(db: DbOrTx, id: number, details: UploadDetails): Promise<UploadRow | undefined> {
  const [row] = await db.update(uploads).set({ state: 'failed', details }).where(eq(uploads.id, id)).returning();
  return row;
}

export async function deleteUploadRow(tx: Tx, id: number): Promise<UploadRow | undefined> {
  const [row] = await tx.delete(uploads).where(eq(uploads.id, id)).returning();
  return row;
}

/** A finished photo with the same stored original (its variants are the same files). */
export async function readyTwin(db: DbOrTx, sha256: string): Promise<UploadRow | undefined> {
  const [row] = await db
    .select()
    .from(uploads)
    .where(and(eq(uploads.sha256, sha256), eq(uploads.kind, 'image'), eq(uploads.state, 'ready')))
    .limit(1);
  return row;
}

/** Does any row still store its original under this key? */
export async function keyInUse(db: DbOrTx, key: string): Promise<boolean> {
  const [row] = await db.select({ id: uploads.id }).from(uploads).where(eq(uploads.storageKey, key)).limit(1);
  return row !== undefined;
}

export async function shaInUse(db: DbOrTx, sha256: string): Promise<boolean> {
  const [row] = await db.select({ id: uploads.id }).from(uploads).where(eq(uploads.sha256, sha256)).limit(1);
  return row !== undefined;
}

const unreferenced = notExists(sql`(SELECT 1 FROM ${uploadRefs} WHERE ${uploadRefs.uploadId} = ${uploads.id})`);

/**
 * Deletes uploads nothing has referenced since before `cutoff` (and none is a cover): rows
 * first, files by the caller afterwards. The reference check is repeated here, so a stale
 * marker never removes an upload something uses.
 */
export async function deleteUnreferencedBefore(tx: Tx, cutoff: Date): Promise<UploadRow[]> {
  return tx
    .delete(uploads)
    .where(
      and(
        isNotNull(uploads.unreferencedSince),
        lt(uploads.unreferencedSince, cutoff),
        unreferenced,
        notExists(sql`(SELECT 1 FROM ${projects} WHERE ${projects.coverUploadId} = ${uploads.id})`),
      ),
    )
    .returning();
}

/** Markers left by a race between two saves: referenced uploads lose theirs, unreferenced ones get one. */
export async function repairMarkers(db: DbOrTx): Promise<void> {
  await db
    .update(uploads)
    .set({ unreferencedSince: null })
    .where(and(isNotNull(uploads.unreferencedSince), sql`EXISTS (SELECT 1 FROM ${uploadRefs} WHERE ${uploadRefs.uploadId} = ${uploads.id})`));
  await db.update(uploads).set({ unreferencedSince: sql`now()` }).where(and(isNull(uploads.unreferencedSince), unreferenced));
}

export async function processingIds(db: DbOrTx, createdBefore?: Date): Promise<number[]> {
  const rows = await db
    .select({ id: uploads.id })
    .from(uploads)
    .where(and(eq(uploads.state, 'processing'), createdBefore ? lt(uploads.createdAt, createdBefore) : undefined))
    .orderBy(asc(uploads.id));
  return rows.map((r) => r.id);
}

/** Every row's key, digest, state and whether anything references it (for the reconcile). */
export async function allStorageRows(db: DbOrTx) {
  return db
    .select({
      id: uploads.id,
      storageKey: uploads.storageKey,
      sha256: uploads.sha256,
      state: uploads.state,
      referenced: sql<boolean>`EXISTS (SELECT 1 FROM ${uploadRefs} WHERE ${uploadRefs.uploadId} = ${uploads.id})`,
    })
    .from(uploads);
}

export async function deleteRows(db: DbOrTx, ids: number[]): Promise<void> {
  if (ids.length) await db.delete(uploads).where(inArray(uploads.id, ids));
}

export async function markMissing(db: DbOrTx, ids: number[], failure: string): Promise<void> {
  if (!ids.length) return;
  await db
    .update(uploads)
    .set({ state: 'failed', details: sql`${uploads.details} || ${JSON.stringify({ failure })}::jsonb` })
    .where(inArray(uploads.id, ids));
}

// --- references ------------------------------------------------------------------------------

export async function deleteRefs(tx: Tx, subject: string, subjectId: number): Promise<number[]> {
  const rows = await tx
    .delete(uploadRefs)
    .where(and(eq(uploadRefs.subject, subject), eq(uploadRefs.subjectId, subjectId)))
    .returning({ id: uploadRefs.uploadId });
  return rows.map((r) => r.id);
}

export async function idsInProject(tx: DbOrTx, ids: number[], projectId: number): Promise<number[]> {
  if (!ids.length) return [];
  const rows = await tx
    .select({ id: uploads.id })
    .from(uploads)
    .where(and(inArray(uploads.id, ids), eq(uploads.projectId, projectId)));
  return rows.map((r) => r.id);
}

export async function insertRefs(tx: Tx, subject: string, subjectId: number, ids: number[]): Promise<void> {
  if (ids.length) await tx.insert(uploadRefs).values(ids.map((uploadId) => ({ uploadId, subject, subjectId }))).onConflictDoNothing();
}

export async function clearUnreferenced(tx: Tx, ids: number[]): Promise<void> {
  if (ids.length) {
    await tx.update(uploads).set({ unreferencedSince: null }).where(and(inArray(uploads.id, ids), isNotNull(uploads.unreferencedSince)));
  }
}

export async function markUnreferencedIfUnused(tx: Tx, ids: number[]): Promise<void> {
  if (!ids.length) return;
  await tx
    .update(uploads)
    .set({ unreferencedSince: sql`now()` })
    .where(and(inArray(uploads.id, ids), isNull(uploads.unreferencedSince), unreferenced));
}

// --- what pages show -----------------------------------------------------------------------------

/** Photos of one project a page may show: not failed, not hidden. */
export async function showableImages(db: DbOrTx, projectId: number, ids: number[]): Promise<UploadRow[]> {
  if (!ids.length) return [];
  return db
    .select()
    .from(uploads)
    .where(
      and(
        inArray(uploads.id, ids),
        eq(uploads.projectId, projectId),
        eq(uploads.kind, 'image'),
        ne(uploads.state, 'failed'),
        isNull(uploads.hiddenAt),
      ),
    );
}

/** The cover photos of these projects (ready images only), by project id. */
export async function coversOf(db: DbOrTx, projectIds: number[]): Promise<Map<number, UploadRow>> {
  if (!projectIds.length) return new Map();
  const rows = await db
    .select({ projectId: projects.id, upload: uploads })
    .from(projects)
    .innerJoin(uploads, and(eq(uploads.id, projects.coverUploadId), eq(uploads.projectId, projects.id)))
    .where(and(inArray(projects.id, projectIds), eq(uploads.state, 'ready'), isNull(uploads.hiddenAt)));
  return new Map(rows.map((r) => [r.projectId, r.upload]));
}

export async function setCover(tx: Tx, projectId: number, uploadId: number | null): Promise<void> {
  await tx.update(projects).set({ coverUploadId: uploadId }).where(eq(projects.id, projectId));
}

/** Uploads a project's content points at, for the alt-text check. */
export async function uploadsByIds(db: DbOrTx, projectId: number, ids: number[]): Promise<UploadRow[]> {
  if (!ids.length) return [];
  return db
    .select()
    .from(uploads)
    .where(and(inArray(uploads.id, ids), eq(uploads.projectId, projectId), eq(uploads.kind, 'image')));
}
