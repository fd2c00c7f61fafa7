import { sql } from 'drizzle-orm';
import { healthSchema } from '../../shared/contracts/users';
import type { AppContext } from '../context';
import { access, type ApiRoutes } from '../http/routes';

/** Liveness and database reachability. Answers 503 with db "down" while PostgreSQL is away. */
export function registerHealthRoutes(routes: ApiRoutes, ctx: AppContext) {
  routes.get(
    '/health',
    { summary: 'Service health', tag: 'health', access: access.public, response: healthSchema, session: false },
    async ({ res }) => {
      res.set('Cache-Control', 'no-store');
      try {
        await ctx.db.execute(sql`SELECT 1`);
        return { status: 'ok', db: 'ok' };
      } catch {
        res.status(503);
        return { status: 'degraded', db: 'down' };
      }
    },
  );
}
