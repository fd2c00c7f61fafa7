/**
 * What e-mail delivery reads and writes: notifications with their recipient and the
 * recipient's effective mode for the kind (their setting, else the default), and the
 * `emailed` mark. Drizzle only; rules live in the jobs and the unsubscribe service.
 */
import { and, eq, inArray, sql, type SQL } from 'drizzle-orm';
import type { Db, DbOrTx } from '../../db/client';
import { notifications, notificationSettings, users } from '../../db/schema';
import { defaultNotificationModes, notificationKinds, type NotificationKind } from '../../shared/contracts/errata';
import type { NotificationMode } from '../../shared/domain';

/** The mode a member gets for the notification's kind: their own setting, else the default. */
function effectiveMode(kind: SQL | typeof notifications.kind): SQL<string> {
  const defaults = sql.join(
    notificationKinds.map((k) => sql`WHEN ${k} THEN ${defaultNotificationModes[k]}`),
    sql.raw(' '),
  );
  return sql<string>`COALESCE(${notificationSettings.mode}::text, CASE ${kind} ${defaults} END)`;
}

const settingsJoin = and(
  eq(notificationSettings.userId, notifications.userId),
  eq(notificationSettings.kind, notifications.kind),
);

export interface NotificationForEmail {
  id: number;
  kind: string;
  payload: unknown;
  emailed: boolean;
  createdAt: Date;
  userId: number;
  handle: string;
  displayName: string;
  email: string | null;
  suspended: boolean;
  mode: string;
}

const forEmailColumns = {
  id: notifications.id,
  kind: notifications.kind,
  payload: notifications.payload,
  emailed: notifications.emailed,
  createdAt: notifications.createdAt,
  userId: users.id,
  handle: users.handle,
  displayName: users.displayName,
  email: users.email,
  suspended: sql<boolean>`${users.suspendedAt} IS NOT NULL`,
  mode: effectiveMode(notifications.kind),
};

export async function findNotificationForEmail(db: Db, id: number): Promise<NotificationForEmail | undefined> {
  const [row] = await db
    .select(forEmailColumns)
    .from(notifications)
    .innerJoin(users, eq(users.id, notifications.userId))
    .leftJoin(notificationSettings, settingsJoin)
    .where(eq(notifications.id, id));
  return row;
}

/** Marks rows as e-mailed; returns the ids that were not marked before. */
export async function markEmailed(db: DbOrTx, ids: number[]): Promise<number[]> {
  if (ids.length === 0) return [];
  const rows = await db
    .update(notifications)
    .set({ emailed: true })
    .where(and(inArray(notifications.id, ids), eq(notifications.emailed, false)))
    .returning({ id: notifications.id });
  return rows.map((r) => r.id);
}

const deliverable = and(
  sql`${users.email} IS NOT NULL`,
  sql`${users.suspendedAt} IS NULL`,
  eq(notifications.emailed, false),
);

/** Immediate-mode notifications not e-mailed yet, created in the window (oldest first). */
export async function pendingImmediateIds(db: Db, window: { from: Date; to: Date }, limit: number): Promise<number[]> {
  const rows = await db
    .select({ id: notifications.id })
    .from(notifications)
    .innerJoin(users, eq(users.id, notifications.userId))
    .leftJoin(notificationSettings, settingsJoin)
    .where(
      and(
        deliverable,
        sql`${notifications.createdAt} >= ${window.from.toISOString()}`,
        sql`${notifications.createdAt} < ${window.to.toISOString()}`,
        sql`${effectiveMode(notifications.kind)} = 'immediate'`,
      ),
    )
    .orderBy(notifications.id)
    .limit(limit);
  return rows.map((r) => r.id);
}

/** Daily-mode notifications not e-mailed yet, created before `before`, by member then age. */
export async function pendingDigestRows(db: Db, before: Date): Promise<NotificationForEmail[]> {
  return db
    .select(forEmailColumns)
    .from(notifications)
    .innerJoin(users, eq(users.id, notifications.userId))
    .leftJoin(notificationSettings, settingsJoin)
    .where(
      and(
        deliverable,
        sql`${notifications.createdAt} < ${before.toISOString()}`,
        sql`${effectiveMode(notifications.kind)} = 'daily'`,
      ),
    )
    .orderBy(users.id, notifications.createdAt, notifications.id);
}

export async function userExists(db: Db, userId: number): Promise<boolean> {
  const [row] = await db.select({ id: users.id }).from(users).where(eq(users.id, userId));
  return row !== undefined;
}

/** Each kind's effective mode for one member. */
export async function modesOf(db: DbOrTx, userId: number): Promise<Record<NotificationKind, NotificationMode>> {
  const rows = await db
    .select({ kind: notificationSettings.kind, mode: notificationSettings.mode })
    .from(notificationSettings)
    .where(eq(notificationSettings.userId, userId));
  const modes = { ...defaultNotificationModes };
  for (const row of rows)
    if ((notificationKinds as readonly string[]).includes(row.kind)) modes[row.kind as NotificationKind] = row.mode;
  return modes;
}

export async function setModes(
  db: DbOrTx,
  userId: number,
  kinds: NotificationKind[],
  mode: NotificationMode,
): Promise<void> {
  if (kinds.length === 0) return;
  await db
    .insert(notificationSettings)
    .values(kinds.map((kind) => ({ userId, kind, mode })))
    .onConflictDoUpdate({ target: [notificationSettings.userId, notificationSettings.kind], set: { mode } });
}
