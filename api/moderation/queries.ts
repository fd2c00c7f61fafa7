import { and, asc, count, desc, eq, inArray, max, min, sql } from 'drizzle-orm';
import type { DbOrTx } from '../../db/client';
import { flags, users } from '../../db/schema';
import type { FlagState } from '../../shared/contracts/moderation';
import type { TargetRef } from './targets';

export interface GroupRow {
  targetKind: string;
  targetId: number;
  flagCount: number;
  firstAt: Date;
  lastAt: Date;
}

/** Targets with flags in `state`: most flagged first, then the longest waiting. */
export async function flagGroups(db: DbOrTx, state: FlagState, limit: number, offset: number) {
  const where = eq(flags.state, state);
  const [rows, [totals]] = await Promise.all([
    db
      .select({
        targetKind: flags.targetKind,
        targetId: flags.targetId,
        flagCount: count(),
        firstAt: min(flags.createdAt),
        lastAt: max(flags.createdAt),
      })
      .from(flags)
      .where(where)
      .groupBy(flags.targetKind, flags.targetId)
      .orderBy(desc(count()), asc(min(flags.createdAt)), asc(flags.targetKind), asc(flags.targetId))
      .limit(limit)
      .offset(offset),
    db
      .select({ n: sql<number>`count(DISTINCT (${flags.targetKind}, ${flags.targetId}))::int` })
      .from(flags)
      .where(where),
  ]);
  return { rows: rows as GroupRow[], total: totals?.n ?? 0 };
}

/** Flags on these targets (in `state` when given), oldest first, with their authors and handlers. */
export async function flagsOn(db: DbOrTx, refs: TargetRef[], state?: FlagState) {
  if (!refs.length) return [];
  const pairs = sql.join(
    refs.map((r) => sql`(${r.kind}, ${r.id}::int)`),
    sql`, `,
  );
  const rows = await db.execute<{
    id: number;
    target_kind: string;
    target_id: number;
    reason: string;
    text: string;
    state: string;
    created_at: string;
    handled_at: string | null;
    author_id: number;
    author_handle: string;
    author_display_name: string;
    author_avatar_url: string | null;
    handler_id: number | null;
    handler_handle: string | null;
    handler_display_name: string | null;
    handler_avatar_url: string | null;
  }>(sql`
    SELECT f.id, f.target_kind, f.target_id, f.reason, f.text, f.state, f.created_at, f.handled_at,
           a.id AS author_id, a.handle AS author_handle, a.display_name AS author_display_name, a.avatar_url AS author_avatar_url,
           h.id AS handler_id, h.handle AS handler_handle,
           h.display_name AS handler_display_name, h.avatar_url AS handler_avatar_url
    FROM flags f
    JOIN users a ON a.id = f.author_id
    LEFT JOIN users h ON h.id = f.handled_by
    WHERE (f.target_kind, f.target_id) IN (${pairs}) ${state ? sql`AND f.state = ${state}` : sql``}
    ORDER BY f.created_at, f.id`);
  return rows.rows;
}

export type FlagJoinRow = Awaited<ReturnType<typeof flagsOn>>[number];

/** Closes the target's open flags as `actioned`; returns their ids. */
export async function actionOpenFlags(db: DbOrTx, ref: TargetRef, handledBy: number): Promise<number[]> {
  const rows = await db
    .update(flags)
    .set({ state: 'actioned', handledBy, handledAt: sql`now()` })
    .where(and(eq(flags.targetKind, ref.kind), eq(flags.targetId, ref.id), eq(flags.state, 'open')))
    .returning({ id: flags.id });
  return rows.map((r) => r.id).sort((a, b) => a - b);
}

export async function lockFlag(db: DbOrTx, id: number) {
  const [row] = await db.select().from(flags).where(eq(flags.id, id)).for('update');
  return row;
}

export async function dismissFlag(db: DbOrTx, id: number, handledBy: number) {
  const [row] = await db
    .update(flags)
    .set({ state: 'dismissed', handledBy, handledAt: sql`now()` })
    .where(eq(flags.id, id))
    .returning();
  return row!;
}

export async function usersByIds(db: DbOrTx, ids: number[]) {
  if (!ids.length) return [];
  return db
    .select({ id: users.id, handle: users.handle, displayName: users.displayName, avatarUrl: users.avatarUrl })
    .from(users)
    .where(inArray(users.id, ids));
}
