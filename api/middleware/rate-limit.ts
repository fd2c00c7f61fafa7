/**
 * Rate limits kept in PostgreSQL (rate-limiter-flexible's store), so every API process of a
 * scaled-out deployment counts against the same budget. Signed-in requests are counted per
 * member, anonymous ones per client address.
 *
 * `newAccountPoints` gives accounts younger than a day a tighter budget of their own (counted
 * under `<name>-new`), on top of the ordinary one: a fresh account made to spam runs dry long
 * before an established member would notice any limit.
 */
import type { RequestHandler } from 'express';
import { eq } from 'drizzle-orm';
import { RateLimiterMemory, RateLimiterPostgres, RateLimiterRes } from 'rate-limiter-flexible';
import { users } from '../../db/schema';
import type { AppContext } from '../context';
import { fail } from '../http/errors';

export interface LimitSpec {
  /** Names the budget; also the key prefix in the table. */
  name: string;
  points: number;
  durationSeconds: number;
  /** The budget, in the same window, of a signed-in account created less than a day ago. */
  newAccountPoints?: number;
  /**
   * Where the counts live: PostgreSQL (shared by every API process; the default) or this
   * process's memory — for read routes, where a write per request would cost more than the
   * read, and a budget per process is enough to stop one client hammering it.
   */
  store?: 'postgres' | 'memory';
}

/** How long an account counts as new. */
export const NEW_ACCOUNT_MS = 24 * 60 * 60 * 1000;

/** A quarter of the budget (at least 1): what a first-day account gets unless a route says otherwise. */
export const newAccountShare = (points: number) => Math.max(1, Math.floor(points / 4));

function limiter(ctx: AppContext, keyPrefix: string, points: number, duration: number, store: LimitSpec['store'] = 'postgres') {
  if (store === 'memory') return new RateLimiterMemory({ keyPrefix, points, duration });
  return new RateLimiterPostgres({
    storeClient: ctx.database.pool,
    storeType: 'pool',
    tableName: 'rate_limits',
    tableCreated: true, // created by the migrations
    clearExpiredByTimeout: false, // expired rows are swept by a job, not a timer per limiter
    keyPrefix,
    points,
    duration,
  });
}

async function isNewAccount(ctx: AppContext, userId: number): Promise<boolean> {
  const [row] = await ctx.db.select({ createdAt: users.createdAt }).from(users).where(eq(users.id, userId));
  return row !== undefined && Date.now() - row.createdAt.getTime() < NEW_ACCOUNT_MS;
}

export function rateLimit(ctx: AppContext, spec: LimitSpec): RequestHandler {
  const ordinary = limiter(ctx, spec.name, spec.points, spec.durationSeconds, spec.store);
  const firstDay =
    spec.newAccountPoints !== undefined
      ? limiter(ctx, `${spec.name}-new`, spec.newAccountPoints, spec.durationSeconds, spec.store)
      : null;
  return async (req, res, next) => {
    const key = req.user ? `u${req.user.id}` : `ip${req.ip ?? 'unknown'}`;
    try {
      if (firstDay && req.user && (await isNewAccount(ctx, req.user.id))) await firstDay.consume(key);
      await ordinary.consume(key);
    } catch (outcome) {
      if (outcome instanceof RateLimiterRes) {
        const seconds = Math.max(1, Math.ceil(outcome.msBeforeNext / 1000));
        res.set('Retry-After', String(seconds));
        throw fail.rateLimited(seconds);
      }
      throw outcome;
    }
    next();
  };
}

/**
 * Per-member budgets of what members write on other people's content, set once here because
 * several routers share a budget (comments on errata and on proposals count together). First-day
 * accounts get a quarter of each.
 */
export const memberBudgets = {
  proposals: { name: 'proposals', points: 20, durationSeconds: 3600, newAccountPoints: newAccountShare(20) },
  comments: { name: 'comments', points: 30, durationSeconds: 60, newAccountPoints: newAccountShare(30) },
  flags: { name: 'flags', points: 20, durationSeconds: 3600, newAccountPoints: newAccountShare(20) },
  uploads: { name: 'uploads', points: 120, durationSeconds: 60, newAccountPoints: newAccountShare(120) },
} satisfies Record<string, LimitSpec>;
