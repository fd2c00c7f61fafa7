/**
 * Saving versioned content without lost updates. A save names the revision it was based on.
 *
 * - Based on the current revision: written as the next revision.
 * - Based on an older one: three-way merged (base = that revision, ours = the save, theirs = the
 *   current text). Non-overlapping changes merge line by line and the save succeeds as `merged`;
 *   overlapping ones answer 409 `edit_conflict` with the current content and the regions.
 *
 * The current row is read with FOR UPDATE, so concurrent saves of one item queue at the database
 * and each merges against what the previous one committed. The write is still a conditional
 * UPDATE (`… WHERE current_revision = <the one we read>`) in the same transaction as the revision
 * insert, and revision numbers are unique per item: two saves can never land on one number. Should
 * the conditional update ever see zero rows, the transaction rolls back and goes round again.
 */
import { createHash } from 'node:crypto';
import { mergeFields, type FieldConflict } from '../../shared/merge';
import type { FieldValue } from '../../shared/diff';
import type { EditConflict, SaveOutcome } from '../../shared/contracts/projects';
import type { RevisionSubject } from '../../shared/domain';
import type { DbOrTx, Tx } from '../../db/client';
import { AppError } from '../http/errors';
import { findRevision, insertRevision } from './queries';

export type Fields = Record<string, FieldValue>;

/** Stable hash of content: keys sorted, so field order never changes the hash. */
export function contentHash(fields: Fields): string {
  const canonical = JSON.stringify(Object.keys(fields).sort().map((k) => [k, fields[k] ?? null]));
  return createHash('sha256').update(canonical).digest('hex');
}

function sameContent(a: Fields, b: Fields): boolean {
  return contentHash(a) === contentHash(b);
}

export interface VersionedStore<F extends Fields> {
  subject: RevisionSubject;
  subjectId: number;
  projectId: number | null;
  /** Fields whose conflicts are shown as text regions (multi-line Markdown); others as values. */
  textFields: ReadonlyArray<keyof F & string>;
  /** The current revision number and content, read and locked (FOR UPDATE) inside the transaction. */
  loadCurrent(tx: Tx): Promise<{ revision: number; fields: F }>;
  /** Conditional update: write `fields` as revision `expected + 1` only if still at `expected`. */
  write(tx: Tx, expected: number, fields: F): Promise<boolean>;
  /** How a revision row stores the content (`title`/`body` columns or `fields`). */
  toRow(fields: F): { title?: string | null; body?: string | null; fields?: unknown };
  /** Reads the content back out of a stored revision. */
  fromRow(row: { title: string | null; body: string | null; fields: unknown }): F;
}

export interface SaveRequest<F extends Fields> {
  authorId: number;
  baseRevision: number;
  fields: F;
  message: string;
  origin: 'edit' | 'restore' | 'proposal' | 'resolve';
  creditedUserId?: number | null;
  proposalId?: number | null;
}

export interface SaveResult {
  outcome: SaveOutcome;
  revision: number;
  mergedWith: { base: number; theirs: number } | null;
}

const MAX_ATTEMPTS = 8;

/** `db` may be a transaction: the save then runs in a savepoint inside it. */
export async function saveVersioned<F extends Fields>(
  db: DbOrTx,
  store: VersionedStore<F>,
  request: SaveRequest<F>,
  afterWrite?: (tx: Tx, revision: number) => Promise<void>,
): Promise<SaveResult> {
  for (let attempt = 0; attempt < MAX_ATTEMPTS; attempt++) {
    const result = await db.transaction(async (tx): Promise<SaveResult | null> => {
      const current = await store.loadCurrent(tx);
      if (request.baseRevision > current.revision) {
        throw new AppError('validation_failed', `Revision ${request.baseRevision} does not exist yet (latest is ${current.revision}).`, {
          issues: [{ path: 'baseRevision', message: 'newer than the latest revision' }],
        });
      }
      let fields = request.fields;
      let outcome: SaveOutcome = 'saved';
      let mergedWith: SaveResult['mergedWith'] = null;

      if (request.baseRevision < current.revision) {
        const baseRow = await findRevision(tx, store.subject, store.subjectId, request.baseRevision);
        if (!baseRow) throw new AppError('validation_failed', `Revision ${request.baseRevision} was not found.`);
        const base = store.fromRow(baseRow);
        const merge = mergeFields(base, request.fields, current.fields);
        if (!merge.clean) {
          const author = await findRevision(tx, store.subject, store.subjectId, current.revision);
          throw conflictError(store, request, current, merge.fields, merge.conflicts, author);
        }
        fields = merge.fields;
        outcome = 'merged';
        mergedWith = { base: request.baseRevision, theirs: current.revision };
      }

      if (sameContent(fields, current.fields)) {
        return { outcome: 'unchanged', revision: current.revision, mergedWith };
      }
      const written = await store.write(tx, current.revision, fields);
      if (!written) return null; // someone saved in between: go round again
      const number = current.revision + 1;
      await insertRevision(tx, {
        subject: store.subject,
        subjectId: store.subjectId,
        projectId: store.projectId,
        number,
        parentNumber: current.revision,
        authorId: request.authorId,
        creditedUserId: request.creditedUserId ?? null,
        proposalId: request.proposalId ?? null,
        message: request.message,
        ...store.toRow(fields),
        contentHash: contentHash(fields),
        origin: outcome === 'merged' ? 'merge' : request.origin,
      });
      await afterWrite?.(tx, number);
      return { outcome, revision: number, mergedWith };
    });
    if (result) return result;
  }
  throw new AppError('conflict', 'This item is being saved by others right now. Reload and try again.');
}

function conflictError<F extends Fields>(
  store: VersionedStore<F>,
  request: SaveRequest<F>,
  current: { revision: number; fields: F },
  merged: F,
  conflicts: FieldConflict<keyof F & string>[],
  currentRow: Awaited<ReturnType<typeof findRevision>>,
): AppError {
  const details: EditConflict = {
    baseRevision: request.baseRevision,
    current: {
      revision: current.revision,
      fields: current.fields,
      author: currentRow
        ? { id: currentRow.authorId, handle: currentRow.authorHandle, displayName: currentRow.authorName, avatarUrl: currentRow.authorAvatar }
        : null,
      createdAt: (currentRow?.createdAt ?? new Date()).toISOString(),
    },
    chunks: {},
    fieldConflicts: [],
    merged: { ...merged },
  };
  for (const conflict of conflicts) {
    if (store.textFields.includes(conflict.field) && conflict.chunks) details.chunks[conflict.field] = conflict.chunks;
    else details.fieldConflicts.push({ field: conflict.field, base: conflict.base, ours: conflict.ours, theirs: conflict.theirs });
  }
  return new AppError(
    'edit_conflict',
    `Someone saved revision ${current.revision} while you were editing revision ${request.baseRevision}, and your changes overlap. Nothing was lost: choose what to keep.`,
    details,
  );
}

/** The base revision of a save: the body field, or an `If-Match: "<n>"` header; 428 without. */
export function baseRevisionOf(bodyValue: number | undefined, ifMatch: string | undefined): number {
  if (bodyValue !== undefined) return bodyValue;
  const match = ifMatch?.trim().match(/^(?:W\/)?"?(\d{1,10})"?$/);
  if (match) return Number(match[1]);
  throw new AppError(
    'precondition_required',
    'Say which revision this save is based on: send baseRevision in the body or an If-Match header with the revision number.',
  );
}
