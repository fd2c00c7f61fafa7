import { and, count, desc, eq, ilike, or, sql, type SQL } from 'drizzle-orm';
import type { DbOrTx } from '../../db/client';
import { auditLog, users } from '../../db/schema';

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

export interface AuditFilter {
  q?: string | undefined;
  action?: string | undefined;
  actorHandle?: string | undefined;
  targetKind?: string | undefined;
  targetId?: string | undefined;
  limit: number;
  offset: number;
}

/** Entries matching every given filter, newest first, with their actors. */
export async function listAudit(db: DbOrTx, filter: AuditFilter) {
  const conditions: SQL[] = [];
  if (filter.q) {
    const pattern = `%${filter.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    const match = or(
      ilike(auditLog.action, pattern),
      ilike(auditLog.reason, pattern),
      ilike(auditLog.targetId, pattern),
      ilike(auditLog.targetKind, pattern),
      ilike(users.handle, pattern),
    );
    if (match) conditions.push(match);
  }
  if (filter.action) conditions.push(eq(auditLog.action, filter.action));
  if (filter.actorHandle) conditions.push(sql`lower(${users.handle}) = lower(${filter.actorHandle})`);
  if (filter.targetKind) conditions.push(eq(auditLog.targetKind, filter.targetKind));
  if (filter.targetId) conditions.push(eq(auditLog.targetId, filter.targetId));
  const where = conditions.length ? and(...conditions) : undefined;
  const [rows, [totals]] = await Promise.all([
    db
      .select({
        entry: auditLog,
        actor: { id: users.id, handle: users.handle, displayName: users.displayName, avatarUrl: users.avatarUrl },
      })
      .from(auditLog)
      .leftJoin(users, eq(users.id, auditLog.actorId))
      .where(where)
      .orderBy(desc(auditLog.at), desc(auditLog.id))
      .limit(filter.limit)
      .offset(filter.offset),
    db.select({ n: count() }).from(auditLog).leftJoin(users, eq(users.id, auditLog.actorId)).where(where),
  ]);
  return { rows, total: totals?.n ?? 0 };
}
