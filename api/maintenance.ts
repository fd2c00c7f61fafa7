/**
 * Periodic housekeeping of one process: expired sessions and rate-limit counters, and
 * projects past their restore window. Each sweep is idempotent, so several API processes
 * running it at once do no harm.
 */
import { sql } from 'drizzle-orm';
import type { AppContext } from './context';
import { purgeExpiredProjects } from './projects/service';

export async function sweepOnce(ctx: AppContext): Promise<{ purgedProjects: string[] }> {
  await ctx.db.execute(sql`DELETE FROM session WHERE expire < now()`);
  await ctx.db.execute(sql`DELETE FROM rate_limits WHERE expire IS NOT NULL AND expire < ${Date.now()}`);
  const purgedProjects = await purgeExpiredProjects(ctx);
  if (purgedProjects.length) ctx.log.info(`purged deleted projects past their restore window: ${purgedProjects.join(', ')}`);
  return { purgedProjects };
}

export function startMaintenance(ctx: AppContext, everyMs = 60 * 60_000): () => void {
  const run = () => sweepOnce(ctx).catch((error: unknown) => ctx.log.warn(`maintenance sweep failed: ${(error as Error).message}`));
  void run();
  const timer = setInterval(run, everyMs);
  timer.unref();
  return () => clearInterval(timer);
}
