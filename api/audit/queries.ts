import type { DbOrTx } from '../../db/client';
import { auditLog } from '../../db/schema';

export interface AuditEntry {
  actorId: number | null;
  action: string;
  targetKind: string;
  targetId: string | number;
  projectId?: number | null;
  before?: unknown;
  after?: unknown;
  reason?: string;
}

/** Append one entry. Call inside the transaction that made the change, so both or neither land. */
export async function appendAudit(db: DbOrTx, entry: AuditEntry): Promise<void> {
  await db.insert(auditLog).values({
    actorId: entry.actorId,
    action: entry.action,
    targetKind: entry.targetKind,
    targetId: String(entry.targetId),
    projectId: entry.projectId ?? null,
    before: entry.before ?? null,
    after: entry.after ?? null,
    reason: entry.reason ?? '',
  });
}
