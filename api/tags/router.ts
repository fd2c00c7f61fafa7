import { tagSuggestQuerySchema, tagSuggestionsSchema } from '../../shared/contracts/errata';
import {
  tagCurationResultSchema,
  tagEditSchema,
  tagHistorySchema,
  tagIndexQuerySchema,
  tagIndexSchema,
  tagMergeSchema,
  tagPageResponseSchema,
  tagReasonSchema,
  tagRejectSchema,
  tagRequiredReasonSchema,
  tagSlugParamsSchema,
} from '../../shared/contracts/tags';
import type { AppContext } from '../context';
import { access, type ApiRoutes } from '../http/routes';
import { rateLimit } from '../middleware/rate-limit';
import * as curation from './curation';
import { tagIndex, tagPage } from './pages';
import { suggestTags } from './service';

export function registerTagRoutes(routes: ApiRoutes, ctx: AppContext) {
  const tag = 'tags';
  const writes = rateLimit(ctx, { name: 'writes', points: 300, durationSeconds: 60 });

  routes.get(
    '/tags/suggest',
    {
      summary: 'Tags to offer while typing: approved ones, plus your own pending ones',
      tag,
      access: access.public,
      query: tagSuggestQuerySchema,
      response: tagSuggestionsSchema,
    },
    ({ user, query }) => suggestTags(ctx, user, query.q),
  );

  routes.get(
    '/tags',
    {
      summary: 'The tag index with visible uses per kind (sortable by name, count or newest)',
      tag,
      access: access.public,
      query: tagIndexQuerySchema,
      response: tagIndexSchema,
    },
    ({ user, query }) => tagIndex(ctx, user, query),
  );

  routes.get(
    '/tags/:tagSlug',
    {
      summary: "A tag's page (or, for a merged tag or an alias, where it went)",
      tag,
      access: access.public,
      params: tagSlugParamsSchema,
      response: tagPageResponseSchema,
    },
    ({ user, params }) => tagPage(ctx, user, params.tagSlug),
  );

  routes.get(
    '/tags/:tagSlug/history',
    {
      summary: "A tag's curation history (moderators)",
      tag,
      access: access.moderator,
      params: tagSlugParamsSchema,
      response: tagHistorySchema,
    },
    ({ params }) => curation.tagHistory(ctx, params.tagSlug),
  );

  const curate = {
    tag,
    access: access.moderator,
    params: tagSlugParamsSchema,
    response: tagCurationResultSchema,
    before: [writes],
  };

  routes.post(
    '/tags/:tagSlug/approve',
    { ...curate, summary: 'Approve a pending tag (moderators)', body: tagReasonSchema },
    ({ user, params, body }) => curation.approveTag(ctx, user!, params.tagSlug, body.reason),
  );

  routes.post(
    '/tags/:tagSlug/reject',
    {
      ...curate,
      summary: 'Reject a pending tag, optionally replacing it by an approved one (moderators)',
      body: tagRejectSchema,
    },
    ({ user, params, body }) => curation.rejectTag(ctx, user!, params.tagSlug, body),
  );

  routes.patch(
    '/tags/:tagSlug',
    {
      ...curate,
      summary: 'Rename a tag or edit its description; a new slug keeps the old one as an alias (moderators)',
      body: tagEditSchema,
    },
    ({ user, params, body }) => curation.editTag(ctx, user!, params.tagSlug, body),
  );

  routes.post(
    '/tags/:tagSlug/merge',
    {
      ...curate,
      summary: 'Merge a tag into another: its content is retagged, its slug becomes an alias (moderators)',
      body: tagMergeSchema,
    },
    ({ user, params, body }) => curation.mergeTag(ctx, user!, params.tagSlug, body),
  );

  routes.post(
    '/tags/:tagSlug/unmerge',
    {
      ...curate,
      summary: 'Undo a merge: the content carries the tag again (moderators)',
      body: tagRequiredReasonSchema,
    },
    ({ user, params, body }) => curation.unmergeTag(ctx, user!, params.tagSlug, body.reason),
  );

  routes.post(
    '/tags/:tagSlug/deprecate',
    {
      ...curate,
      summary: 'Deprecate a tag: no new use, existing use kept (moderators)',
      body: tagRequiredReasonSchema,
    },
    ({ user, params, body }) => curation.deprecateTag(ctx, user!, params.tagSlug, body.reason),
  );

  routes.post(
    '/tags/:tagSlug/undeprecate',
    { ...curate, summary: 'Take a tag out of deprecation (moderators)', body: tagReasonSchema },
    ({ user, params, body }) => curation.undeprecateTag(ctx, user!, params.tagSlug, body.reason),
  );
}
