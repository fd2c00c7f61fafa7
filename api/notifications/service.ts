/**
 * Notifications in the app, per-kind delivery settings, and follows. A notification row is
 * written in the same transaction as what caused it; its e-mail is queued after the commit
 * (`queueNotificationEmails`), and a periodic sweep queues any a crash left behind.
 */
import { and, count, desc, eq, inArray, isNull, sql } from 'drizzle-orm';
import {
  defaultNotificationModes,
  notificationKinds,
  type NotificationKind,
  type NotificationList,
  type NotificationPayload,
  type NotificationSettings,
} from '../../shared/contracts/errata';
import type { NotificationMode } from '../../shared/domain';
import type { DbOrTx, Tx } from '../../db/client';
import { follows, notificationSettings, notifications, projectMembers, users } from '../../db/schema';
import type { AppContext } from '../context';
import type { AuthUser } from '../http/routes';

export const LIST_LIMIT = 50;

/**
 * Write one notification per recipient (the actor and suspended members excluded, duplicates
 * folded) in the caller's transaction. Returns the new ids, to queue their e-mails after commit.
 */
export async function notify(
  tx: Tx,
  recipients: number[],
  kind: NotificationKind,
  payload: NotificationPayload,
  actorId: number,
): Promise<number[]> {
  const ids = [...new Set(recipients)].filter((id) => id !== actorId);
  if (!ids.length) return [];
  const active = await tx
    .select({ id: users.id })
    .from(users)
    .where(and(inArray(users.id, ids), isNull(users.suspendedAt)));
  if (!active.length) return [];
  const rows = await tx
    .insert(notifications)
    .values(active.map((u) => ({ userId: u.id, kind, payload })))
    .returning({ id: notifications.id });
  return rows.map((r) => r.id);
}

/**
 * Queue the e-mail of each notification. Failures here only delay mail: the row is committed
 * and the sweep (enqueuePendingNotificationEmails) picks up anything not queued.
 */
export async function queueNotificationEmails(ctx: AppContext, ids: number[]): Promise<void> {
  for (const id of ids) {
    try {
      await ctx.jobs.send('notification-email', { notificationId: id }, { singletonKey: `notification-${id}` });
    } catch (error) {
      ctx.log.warn(`could not queue the e-mail of notification ${id}: ${(error as Error).message}`);
    }
  }
}

/**
 * Run a transaction that may create notifications (`collect` their ids), then queue their
 * e-mails once it has committed — never before, so a worker never sees an uncommitted row.
 */
export async function withNotifications<T>(
  ctx: AppContext,
  fn: (tx: Tx, collect: (ids: number[]) => void) => Promise<T>,
): Promise<T> {
  const ids: number[] = [];
  const result = await ctx.db.transaction((tx) => fn(tx, (more) => ids.push(...more)));
  await queueNotificationEmails(ctx, ids);
  return result;
}

/** The project's owner and editors. */
export async function projectMemberIds(db: DbOrTx, projectId: number): Promise<number[]> {
  const rows = await db
    .select({ id: projectMembers.userId })
    .from(projectMembers)
    .where(eq(projectMembers.projectId, projectId));
  return rows.map((r) => r.id);
}

export async function followerIds(db: DbOrTx, projectId: number): Promise<number[]> {
  const rows = await db.select({ id: follows.userId }).from(follows).where(eq(follows.projectId, projectId));
  return rows.map((r) => r.id);
}

export async function listNotifications(ctx: AppContext, user: AuthUser): Promise<NotificationList> {
  const rows = await ctx.db
    .select()
    .from(notifications)
    .where(eq(notifications.userId, user.id))
    .orderBy(sql`${notifications.readAt} IS NOT NULL`, desc(notifications.createdAt), desc(notifications.id))
    .limit(LIST_LIMIT);
  const [unread] = await ctx.db
    .select({ n: count() })
    .from(notifications)
    .where(and(eq(notifications.userId, user.id), isNull(notifications.readAt)));
  return {
    items: rows.map((r) => ({
      id: r.id,
      kind: r.kind as NotificationKind,
      payload: r.payload as NotificationPayload,
      read: r.readAt !== null,
      createdAt: r.createdAt.toISOString(),
    })),
    unreadCount: unread?.n ?? 0,
  };
}

export async function markRead(
  ctx: AppContext,
  user: AuthUser,
  input: { ids?: number[]; all?: boolean },
): Promise<NotificationList> {
  const mine = eq(notifications.userId, user.id);
  if (input.all) {
    await ctx.db
      .update(notifications)
      .set({ readAt: new Date() })
      .where(and(mine, isNull(notifications.readAt)));
  } else if (input.ids?.length) {
    await ctx.db
      .update(notifications)
      .set({ readAt: new Date() })
      .where(and(mine, inArray(notifications.id, input.ids), isNull(notifications.readAt)));
  }
  return listNotifications(ctx, user);
}

/** Every kind with the member's chosen mode, or the default. */
export async function settingsOf(db: DbOrTx, userId: number): Promise<NotificationSettings> {
  const rows = await db.select().from(notificationSettings).where(eq(notificationSettings.userId, userId));
  const modes = { ...defaultNotificationModes };
  for (const row of rows) {
    if ((notificationKinds as readonly string[]).includes(row.kind)) modes[row.kind as NotificationKind] = row.mode;
  }
  return { modes };
}

export async function setModes(db: DbOrTx, userId: number, modes: Partial<Record<NotificationKind, NotificationMode>>) {
  for (const [kind, mode] of Object.entries(modes)) {
    if (!mode) continue;
    await db
      .insert(notificationSettings)
      .values({ userId, kind, mode })
      .onConflictDoUpdate({ target: [notificationSettings.userId, notificationSettings.kind], set: { mode } });
  }
}

export async function isFollowing(db: DbOrTx, userId: number, projectId: number): Promise<boolean> {
  const [row] = await db
    .select({ userId: follows.userId })
    .from(follows)
    .where(and(eq(follows.userId, userId), eq(follows.projectId, projectId)));
  return row !== undefined;
}

export async function setFollowing(db: DbOrTx, userId: number, projectId: number, following: boolean) {
  if (following) await db.insert(follows).values({ userId, projectId }).onConflictDoNothing();
  else await db.delete(follows).where(and(eq(follows.userId, userId), eq(follows.projectId, projectId)));
}
