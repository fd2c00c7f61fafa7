/**
 * Rate limits kept in PostgreSQL (rate-limiter-flexible's store), so every API process of a
 * scaled-out deployment counts against the same budget. Signed-in requests are counted per
 * member, anonymous ones per client address.
 */
import type { RequestHandler } from 'express';
import { RateLimiterPostgres, RateLimiterRes } from 'rate-limiter-flexible';
import type { AppContext } from '../context';
import { fail } from '../http/errors';

export interface LimitSpec {
  /** Names the budget; also the key prefix in the table. */
  name: string;
  points: number;
  durationSeconds: number;
}

export function rateLimit(ctx: AppContext, spec: LimitSpec): RequestHandler {
  const limiter = new RateLimiterPostgres({
    storeClient: ctx.database.pool,
    storeType: 'pool',
    tableName: 'rate_limits',
    tableCreated: true, // created by the migrations
    clearExpiredByTimeout: false, // expired rows are swept by a job, not a timer per limiter
    keyPrefix: spec.name,
    points: spec.points,
    duration: spec.durationSeconds,
  });
  return async (req, res, next) => {
    const key = req.user ? `u${req.user.id}` : `ip${req.ip ?? 'unknown'}`;
    try {
      await limiter.consume(key);
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
