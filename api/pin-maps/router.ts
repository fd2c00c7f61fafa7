import {
  pinCheckResultSchema,
  pinMapCreateSchema,
  pinMapListSchema,
  pinMapParamsSchema,
  pinMapSchema,
  pinMapUpdateSchema,
} from '../../shared/contracts/checks';
import { slugParamsSchema } from '../../shared/contracts/projects';
import type { AppContext } from '../context';
import type { ApiRoutes } from '../http/routes';
import { rateLimit } from '../middleware/rate-limit';
import { projectAccess, projectOf } from '../projects/access';
import * as service from './service';

export function registerPinMapRoutes(routes: ApiRoutes, ctx: AppContext) {
  const writes = rateLimit(ctx, { name: 'writes', points: 300, durationSeconds: 60 });
  const reader = projectAccess('read');
  const editor = projectAccess('edit');
  const tag = 'pin-maps';

  routes.get(
    '/projects/:slug/pin-maps',
    {
      summary: "A project's pin maps, per board revision and part",
      tag,
      access: reader,
      params: slugParamsSchema,
      response: pinMapListSchema,
    },
    ({ locals }) => {
      const { project, role } = projectOf(locals);
      return service.listPinMaps(ctx, project, role);
    },
  );

  routes.post(
    '/projects/:slug/pin-maps',
    {
      summary: 'Add a pin map for a part on a board revision (editors; 409 pin_map_exists)',
      tag,
      access: editor,
      params: slugParamsSchema,
      body: pinMapCreateSchema,
      response: pinMapSchema,
      status: 201,
      before: [writes],
    },
    ({ user, locals, body }) => service.createPinMap(ctx, user!, projectOf(locals).project, body),
  );

  routes.put(
    '/projects/:slug/pin-maps/:pinMapId',
    {
      summary: 'Save a pin map (editors; a new revision; 409 edit_conflict on an old baseRevision)',
      tag,
      access: editor,
      params: pinMapParamsSchema,
      body: pinMapUpdateSchema,
      response: pinMapSchema,
      before: [writes],
    },
    ({ user, locals, params, body }) =>
      service.updatePinMap(ctx, user!, projectOf(locals).project, params.pinMapId, body),
  );

  routes.delete(
    '/projects/:slug/pin-maps/:pinMapId',
    {
      summary: 'Delete a pin map (editors)',
      tag,
      access: editor,
      params: pinMapParamsSchema,
      status: 204,
      before: [writes],
    },
    async ({ locals, params }) => {
      await service.deletePinMap(ctx, projectOf(locals).project, params.pinMapId);
    },
  );

  routes.get(
    '/projects/:slug/pin-maps/:pinMapId/check',
    {
      summary: "Check a pin map against the part's pin profile",
      tag,
      access: reader,
      params: pinMapParamsSchema,
      response: pinCheckResultSchema,
    },
    ({ locals, params }) => service.checkProjectPinMap(ctx, projectOf(locals).project, params.pinMapId),
  );
}
