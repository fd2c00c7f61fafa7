import type { AdminUser, AdminUserList, AdminUserListQuery, CurrentUser } from '../../shared/contracts/users';
import type { SiteRole } from '../../shared/domain';
import { appendAudit } from '../audit/queries';
import type { AppContext } from '../context';
import { AppError, fail, isUniqueViolation } from '../http/errors';
import type { AuthUser } from '../http/routes';
import * as q from './queries';

export const ADMIN_PAGE_SIZE = 25;

export interface ProviderProfile {
  provider: string;
  providerUserId: string;
  login: string;
  displayName: string;
  email: string | null;
  avatarUrl: string | null;
}

export function toAuthUser(row: q.UserRow): AuthUser {
  return {
    id: row.id,
    handle: row.handle,
    displayName: row.displayName,
    email: row.email,
    avatarUrl: row.avatarUrl,
    role: row.role,
  };
}

export function toCurrentUser(user: AuthUser): CurrentUser {
  return { ...user };
}

function toAdminUser(row: q.UserRow): AdminUser {
  return {
    ...toAuthUser(row),
    suspendedAt: row.suspendedAt?.toISOString() ?? null,
    suspendedReason: row.suspendedReason,
    createdAt: row.createdAt.toISOString(),
  };
}

/** Load the user a session points at; null when gone or suspended (the session then ends). */
export async function loadSessionUser(ctx: AppContext, id: number): Promise<AuthUser | null> {
  const row = await q.findUserById(ctx.db, id);
  if (!row || row.suspendedAt) return null;
  return toAuthUser(row);
}

/**
 * Find or create the member behind a provider account. Members are keyed on the provider's
 * numeric id; the login only proposes a handle, made unique with a numeric suffix if taken.
 */
export async function signInFromProvider(ctx: AppContext, profile: ProviderProfile): Promise<AuthUser> {
  const existingId = await q.findUserIdByIdentity(ctx.db, profile.provider, profile.providerUserId);
  if (existingId !== undefined) {
    const row = await q.findUserById(ctx.db, existingId);
    if (!row) throw new Error(`identity points at missing user ${existingId}`);
    if (row.suspendedAt) throw new AppError('suspended', 'This account is suspended.');
    await q.updateIdentityLogin(ctx.db, profile.provider, profile.providerUserId, profile.login);
    return toAuthUser(row);
  }
  for (let attempt = 0; attempt < 20; attempt++) {
    const handle = attempt === 0 ? profile.login : `${profile.login.slice(0, 34)}-${attempt + 1}`;
    if (await q.handleTaken(ctx.db, handle)) continue;
    try {
      const id = await ctx.db.transaction((tx) =>
        q.insertUserWithIdentity(
          tx,
          {
            handle,
            displayName: profile.displayName.trim() || profile.login,
            email: profile.email,
            avatarUrl: profile.avatarUrl,
          },
          { provider: profile.provider, providerUserId: profile.providerUserId, login: profile.login },
        ),
      );
      const row = await q.findUserById(ctx.db, id);
      if (!row) throw new Error('new user vanished');
      ctx.log.info(`new member @${handle} (${profile.provider} ${profile.providerUserId})`);
      return toAuthUser(row);
    } catch (error) {
      // Two first sign-ins racing for one handle or identity: the loser looks again.
      if (isUniqueViolation(error, 'oauth_identities_provider_key')) return signInFromProvider(ctx, profile);
      if (isUniqueViolation(error, 'users_handle_lower_key')) continue;
      throw error;
    }
  }
  throw new AppError('conflict', 'Could not find a free handle for this account.');
}

export async function updateProfile(ctx: AppContext, user: AuthUser, displayName: string): Promise<AuthUser> {
  await q.updateUser(ctx.db, user.id, { displayName });
  const row = await q.findUserById(ctx.db, user.id);
  if (!row) throw fail.notFound('Your account');
  return toAuthUser(row);
}

export async function listUsersForAdmin(ctx: AppContext, query: AdminUserListQuery): Promise<AdminUserList> {
  const { rows, total } = await q.listUsers(ctx.db, {
    q: query.q,
    role: query.role,
    limit: ADMIN_PAGE_SIZE,
    offset: (query.page - 1) * ADMIN_PAGE_SIZE,
  });
  return { items: rows.map(toAdminUser), total, page: query.page, pageSize: ADMIN_PAGE_SIZE };
}

async function targetOf(ctx: AppContext, actor: AuthUser, handle: string): Promise<q.UserRow> {
  const target = await q.findUserByHandle(ctx.db, handle);
  if (!target) throw fail.notFound(`Member @${handle}`);
  if (target.id === actor.id) throw fail.forbidden('Admins cannot change their own role or suspend themselves.');
  return target;
}

/** Takes effect on the target's next request: sessions load the user fresh every time. */
export async function changeRole(ctx: AppContext, actor: AuthUser, handle: string, role: SiteRole): Promise<AdminUser> {
  const target = await targetOf(ctx, actor, handle);
  if (target.role !== role) {
    await ctx.db.transaction(async (tx) => {
      await q.updateUser(tx, target.id, { role });
      await appendAudit(tx, {
        actorId: actor.id,
        action: 'user.role',
        targetKind: 'user',
        targetId: target.id,
        before: { role: target.role },
        after: { role },
      });
    });
  }
  const row = await q.findUserById(ctx.db, target.id);
  return toAdminUser(row!);
}

/** Suspending ends every session of the member at once. */
export async function setSuspension(
  ctx: AppContext,
  actor: AuthUser,
  handle: string,
  suspended: boolean,
  reason: string,
): Promise<AdminUser> {
  const target = await targetOf(ctx, actor, handle);
  if (Boolean(target.suspendedAt) !== suspended) {
    await ctx.db.transaction(async (tx) => {
      await q.updateUser(tx, target.id, {
        suspendedAt: suspended ? new Date() : null,
        suspendedReason: suspended ? reason : null,
      });
      if (suspended) await q.deleteSessionsOfUser(tx, target.id);
      await appendAudit(tx, {
        actorId: actor.id,
        action: suspended ? 'user.suspend' : 'user.unsuspend',
        targetKind: 'user',
        targetId: target.id,
        before: { suspended: Boolean(target.suspendedAt) },
        after: { suspended },
        reason,
      });
    });
  }
  const row = await q.findUserById(ctx.db, target.id);
  return toAdminUser(row!);
}
