import {
  partListSchema,
  partPageSchema,
  partParamsSchema,
  partRevisionListSchema,
  partUpdateSchema,
  partCreateSchema,
} from '../../shared/contracts/checks';
import type { AppContext } from '../context';
import { access, type ApiRoutes } from '../http/routes';
import { rateLimit } from '../middleware/rate-limit';
import * as service from './service';

export function registerPartRoutes(routes: ApiRoutes, ctx: AppContext) {
  const writes = rateLimit(ctx, { name: 'writes', points: 300, durationSeconds: 60 });
  const tag = 'parts';

  routes.get(
    '/parts',
    {
      summary: 'The parts library, with how many readable errata and lessons mention each part',
      tag,
      access: access.public,
      response: partListSchema,
    },
    ({ user }) => service.listParts(ctx, user),
  );

  routes.get(
    '/parts/:partSlug',
    {
      summary: 'A part: its profile, memory architecture and the errata and lessons that mention it',
      tag,
      access: access.public,
      params: partParamsSchema,
      response: partPageSchema,
    },
    ({ user, params }) => service.partPage(ctx, user, params.partSlug),
  );

  routes.post(
    '/parts',
    {
      summary: 'Add a part to the library (moderators; revision 1 of its profile)',
      tag,
      access: access.moderator,
      body: partCreateSchema,
      response: partPageSchema,
      status: 201,
      before: [writes],
    },
    ({ user, body }) => service.createPart(ctx, user!, body),
  );

  routes.put(
    '/parts/:partSlug',
    {
      summary: 'Correct a part profile (moderators; a new revision; 409 edit_conflict on an old baseRevision)',
      tag,
      access: access.moderator,
      params: partParamsSchema,
      body: partUpdateSchema,
      response: partPageSchema,
      before: [writes],
    },
    ({ user, params, body }) => service.updatePart(ctx, user!, params.partSlug, body),
  );

  routes.get(
    '/parts/:partSlug/revisions',
    {
      summary: 'History of a part profile, newest first',
      tag,
      access: access.public,
      params: partParamsSchema,
      response: partRevisionListSchema,
    },
    ({ params }) => service.partRevisionList(ctx, params.partSlug),
  );
}
