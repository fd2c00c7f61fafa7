import { and, count, desc, eq, ilike, or, sql, type SQL } from 'drizzle-orm';
import type { DbOrTx } from '../../db/client';
import { oauthIdentities, sessions, users } from '../../db/schema';
import type { SiteRole } from '../../shared/domain';

const userColumns = {
  id: users.id,
  handle: users.handle,
  displayName: users.displayName,
  email: users.email,
  avatarUrl: users.avatarUrl,
  role: users.role,
  suspendedAt: users.suspendedAt,
  suspendedReason: users.suspendedReason,
  createdAt: users.createdAt,
};

export type UserRow = {
  id: number;
  handle: string;
  displayName: string;
  email: string | null;
  avatarUrl: string | null;
  role: SiteRole;
  suspendedAt: Date | null;
  suspendedReason: string | null;
  createdAt: Date;
};

export async function findUserById(db: DbOrTx, id: number): Promise<UserRow | undefined> {
  const [row] = await db.select(userColumns).from(users).where(eq(users.id, id));
  return row;
}

export async function findUserByHandle(db: DbOrTx, handle: string): Promise<UserRow | undefined> {
  const [row] = await db
    .select(userColumns)
    .from(users)
    .where(sql`lower(${users.handle}) = lower(${handle})`);
  return row;
}

export async function findUserIdByIdentity(db: DbOrTx, provider: string, providerUserId: string): Promise<number | undefined> {
  const [row] = await db
    .select({ userId: oauthIdentities.userId })
    .from(oauthIdentities)
    .where(and(eq(oauthIdentities.provider, provider), eq(oauthIdentities.providerUserId, providerUserId)));
  return row?.userId;
}

export async function handleTaken(db: DbOrTx, handle: string): Promise<boolean> {
  const [row] = await db
    .select({ id: users.id })
    .from(users)
    .where(sql`lower(${users.handle}) = lower(${handle})`);
  return row !== undefined;
}

export async function insertUserWithIdentity(
  db: DbOrTx,
  user: { handle: string; displayName: string; email: string | null; avatarUrl: string | null; role?: SiteRole },
  identity: { provider: string; providerUserId: string; login: string },
): Promise<number> {
  const [created] = await db.insert(users).values(user).returning({ id: users.id });
  if (!created) throw new Error('insert into users returned no row');
  await db.insert(oauthIdentities).values({ ...identity, userId: created.id });
  return created.id;
}

export async function updateIdentityLogin(db: DbOrTx, provider: string, providerUserId: string, login: string) {
  await db
    .update(oauthIdentities)
    .set({ login })
    .where(and(eq(oauthIdentities.provider, provider), eq(oauthIdentities.providerUserId, providerUserId)));
}

export async function updateUser(
  db: DbOrTx,
  id: number,
  values: Partial<{ displayName: string; role: SiteRole; suspendedAt: Date | null; suspendedReason: string | null }>,
) {
  await db
    .update(users)
    .set({ ...values, updatedAt: new Date() })
    .where(eq(users.id, id));
}

export async function listUsers(
  db: DbOrTx,
  filter: { q?: string | undefined; role?: SiteRole | undefined; limit: number; offset: number },
): Promise<{ rows: UserRow[]; total: number }> {
  const conditions: SQL[] = [];
  if (filter.q) {
    const pattern = `%${filter.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    const match = or(ilike(users.handle, pattern), ilike(users.displayName, pattern));
    if (match) conditions.push(match);
  }
  if (filter.role) conditions.push(eq(users.role, filter.role));
  const where = conditions.length ? and(...conditions) : undefined;
  const rows = await db
    .select(userColumns)
    .from(users)
    .where(where)
    .orderBy(desc(users.createdAt), desc(users.id))
    .limit(filter.limit)
    .offset(filter.offset);
  const [totals] = await db.select({ n: count() }).from(users).where(where);
  return { rows, total: totals?.n ?? 0 };
}

/** End every session of a user at once (suspension): the session store is this table. */
export async function deleteSessionsOfUser(db: DbOrTx, userId: number): Promise<number> {
  const deleted = await db
    .delete(sessions)
    .where(sql`(${sessions.sess} -> 'passport' ->> 'user') = ${String(userId)}`)
    .returning({ sid: sessions.sid });
  return deleted.length;
}
