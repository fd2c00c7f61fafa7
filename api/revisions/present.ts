import type { RevisionDetail, RevisionSummary } from '../../shared/contracts/projects';
import { revisionOrigins } from '../../shared/contracts/projects';
import type { findRevision, RevisionSummaryRow } from './queries';

const origin = (value: string): RevisionSummary['origin'] =>
  (revisionOrigins as readonly string[]).includes(value) ? (value as RevisionSummary['origin']) : 'edit';

export function toRevisionSummary(row: RevisionSummaryRow): RevisionSummary {
  return {
    number: row.number,
    parentNumber: row.parentNumber,
    author: { id: row.authorId, handle: row.authorHandle, displayName: row.authorName, avatarUrl: row.authorAvatar },
    creditedTo:
      row.creditedId !== null && row.creditedHandle !== null && row.creditedName !== null
        ? { id: row.creditedId, handle: row.creditedHandle, displayName: row.creditedName, avatarUrl: row.creditedAvatar }
        : null,
    message: row.message,
    contentHash: row.contentHash,
    origin: origin(row.origin),
    createdAt: row.createdAt.toISOString(),
  };
}

export function toRevisionDetail(row: NonNullable<Awaited<ReturnType<typeof findRevision>>>): RevisionDetail {
  return {
    ...toRevisionSummary(row),
    title: row.title,
    body: row.body,
    fields: (row.fields as Record<string, unknown> | null) ?? null,
  };
}
