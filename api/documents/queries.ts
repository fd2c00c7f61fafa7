import { and, eq, isNull, max, sql } from 'drizzle-orm';
import type { DbOrTx } from '../../db/client';
import { documents } from '../../db/schema';
import type { DocumentKind } from '../../shared/domain';
import { insertRevision } from '../revisions/queries';
import { contentHash } from '../revisions/versioned';

export type DocumentRow = typeof documents.$inferSelect;

export interface DocumentFields {
  [key: string]: string | null;
  title: string;
  body: string;
  loggedOn: string | null;
}

export const fieldsOf = (doc: Pick<DocumentRow, 'title' | 'body' | 'loggedOn'>): DocumentFields => ({
  title: doc.title,
  body: doc.body,
  loggedOn: doc.loggedOn,
});

export async function findDocument(db: DbOrTx, projectId: number, id: number): Promise<DocumentRow | undefined> {
  const [row] = await db
    .select()
    .from(documents)
    .where(and(eq(documents.projectId, projectId), eq(documents.id, id), isNull(documents.deletedAt)));
  return row;
}

/** The row, locked until the transaction ends: concurrent saves of one document queue here. */
export async function lockDocument(db: DbOrTx, projectId: number, id: number): Promise<DocumentRow | undefined> {
  const [row] = await db
    .select()
    .from(documents)
    .where(and(eq(documents.projectId, projectId), eq(documents.id, id), isNull(documents.deletedAt)))
    .for('update');
  return row;
}

export async function nextSectionPosition(db: DbOrTx, projectId: number): Promise<number> {
  const [row] = await db
    .select({ p: max(documents.position) })
    .from(documents)
    .where(and(eq(documents.projectId, projectId), eq(documents.kind, 'section')));
  return (row?.p ?? -1) + 1;
}

/** A new document at revision 1, with that revision, in the caller's transaction. */
export async function insertDocumentWithRevision(
  db: DbOrTx,
  input: {
    projectId: number;
    kind: DocumentKind;
    title: string;
    body: string;
    position: number;
    loggedOn: string | null;
    authorId: number;
    message?: string;
    createdAt?: Date;
  },
): Promise<DocumentRow> {
  const at = input.createdAt ?? new Date();
  const [row] = await db
    .insert(documents)
    .values({
      projectId: input.projectId,
      kind: input.kind,
      title: input.title,
      body: input.body,
      position: input.position,
      loggedOn: input.loggedOn,
      currentRevision: 1,
      createdBy: input.authorId,
      createdAt: at,
      updatedAt: at,
    })
    .returning();
  if (!row) throw new Error('insert into documents returned no row');
  const fields = fieldsOf(row);
  await insertRevision(db, {
    subject: 'document',
    subjectId: row.id,
    projectId: input.projectId,
    number: 1,
    parentNumber: null,
    authorId: input.authorId,
    message: input.message ?? (input.kind === 'section' ? `Added the section “${input.title}”` : 'Wrote the log entry'),
    title: row.title,
    body: row.body,
    fields: { loggedOn: row.loggedOn },
    contentHash: contentHash(fields),
    origin: 'create',
  });
  return row;
}

/** Conditional write: only when the document is still at `expected`. */
export async function writeDocument(db: DbOrTx, id: number, expected: number, fields: DocumentFields, at = new Date()) {
  const updated = await db
    .update(documents)
    .set({
      title: fields.title,
      body: fields.body,
      loggedOn: fields.loggedOn,
      currentRevision: sql`${documents.currentRevision} + 1`,
      updatedAt: at,
    })
    .where(and(eq(documents.id, id), eq(documents.currentRevision, expected), isNull(documents.deletedAt)))
    .returning({ id: documents.id });
  return updated.length === 1;
}

export async function softDeleteDocument(db: DbOrTx, projectId: number, id: number): Promise<boolean> {
  const removed = await db
    .update(documents)
    .set({ deletedAt: new Date() })
    .where(and(eq(documents.projectId, projectId), eq(documents.id, id), isNull(documents.deletedAt)))
    .returning({ id: documents.id });
  return removed.length > 0;
}
