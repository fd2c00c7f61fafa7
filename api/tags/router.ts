import { tagSuggestQuerySchema, tagSuggestionsSchema } from '../../shared/contracts/errata';
import type { AppContext } from '../context';
import { access, type ApiRoutes } from '../http/routes';
import { suggestTags } from './service';

export function registerTagRoutes(routes: ApiRoutes, ctx: AppContext) {
  routes.get(
    '/tags/suggest',
    {
      summary: 'Tags to offer while typing: approved ones, plus your own pending ones',
      tag: 'tags',
      access: access.public,
      query: tagSuggestQuerySchema,
      response: tagSuggestionsSchema,
    },
    ({ user, query }) => suggestTags(ctx, user, query.q),
  );
}
