import { and, desc, eq, sql } from 'drizzle-orm';
import { alias } from 'drizzle-orm/pg-core';
import type { DbOrTx } from '../../db/client';
import { revisions, users } from '../../db/schema';
import type { RevisionSubject } from '../../shared/domain';

export interface NewRevision {
  subject: RevisionSubject;
  subjectId: number;
  projectId: number | null;
  number: number;
  parentNumber: number | null;
  authorId: number;
  creditedUserId?: number | null;
  proposalId?: number | null;
  message: string;
  title?: string | null;
  body?: string | null;
  fields?: unknown;
  contentHash: string;
  origin: string;
  /** Only the demo seed backdates revisions; everything else is stamped by the database. */
  createdAt?: Date;
}

/** Append one immutable revision (the database refuses any later UPDATE of it). */
export async function insertRevision(db: DbOrTx, revision: NewRevision): Promise<{ id: number; createdAt: Date }> {
  const [row] = await db
    .insert(revisions)
    .values({
      ...revision,
      title: revision.title ?? null,
      body: revision.body ?? null,
      fields: revision.fields ?? null,
      creditedUserId: revision.creditedUserId ?? null,
      proposalId: revision.proposalId ?? null,
    })
    .returning({ id: revisions.id, createdAt: revisions.createdAt });
  if (!row) throw new Error('insert into revisions returned no row');
  return row;
}

const author = alias(users, 'author');
const credited = alias(users, 'credited');

const summaryColumns = {
  number: revisions.number,
  parentNumber: revisions.parentNumber,
  message: revisions.message,
  contentHash: revisions.contentHash,
  origin: revisions.origin,
  createdAt: revisions.createdAt,
  authorId: author.id,
  authorHandle: author.handle,
  authorName: author.displayName,
  authorAvatar: author.avatarUrl,
  creditedId: credited.id,
  creditedHandle: credited.handle,
  creditedName: credited.displayName,
  creditedAvatar: credited.avatarUrl,
};

export type RevisionSummaryRow = Awaited<ReturnType<typeof listRevisions>>[number];

export async function listRevisions(db: DbOrTx, subject: RevisionSubject, subjectId: number) {
  return db
    .select(summaryColumns)
    .from(revisions)
    .innerJoin(author, eq(author.id, revisions.authorId))
    .leftJoin(credited, eq(credited.id, revisions.creditedUserId))
    .where(and(eq(revisions.subject, subject), eq(revisions.subjectId, subjectId)))
    .orderBy(desc(revisions.number));
}

export async function findRevision(db: DbOrTx, subject: RevisionSubject, subjectId: number, number: number) {
  const [row] = await db
    .select({ ...summaryColumns, title: revisions.title, body: revisions.body, fields: revisions.fields })
    .from(revisions)
    .innerJoin(author, eq(author.id, revisions.authorId))
    .leftJoin(credited, eq(credited.id, revisions.creditedUserId))
    .where(and(eq(revisions.subject, subject), eq(revisions.subjectId, subjectId), eq(revisions.number, number)));
  return row;
}

export async function countRevisions(db: DbOrTx, subject: RevisionSubject, subjectId: number): Promise<number> {
  const [row] = await db
    .select({ n: sql<number>`count(*)::int` })
    .from(revisions)
    .where(and(eq(revisions.subject, subject), eq(revisions.subjectId, subjectId)));
  return row?.n ?? 0;
}
