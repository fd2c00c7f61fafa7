import { searchQuerySchema, searchResultSchema } from '../../shared/contracts/search';
import type { AppContext } from '../context';
import { access, type ApiRoutes } from '../http/routes';
import { rateLimit } from '../middleware/rate-limit';
import { search } from './service';

export function registerSearchRoutes(routes: ApiRoutes, ctx: AppContext) {
  // Counted in the process: a search is a read, and a counter write per search cost more than a
  // rare search itself (docs/benchmarks.md).
  const searches = rateLimit(ctx, { name: 'search', points: ctx.config.SEARCH_RATE_PER_MINUTE, durationSeconds: 60, store: 'memory' });
  routes.get(
    '/search',
    {
      summary: 'Search every project you can read: words, "phrases", -exclusions, OR; filters and facets',
      tag: 'search',
      access: access.public,
      query: searchQuerySchema,
      response: searchResultSchema,
      before: [searches],
    },
    ({ user, query }) => search(ctx, user, query),
  );
}
