import {
  buildCreateSchema,
  buildListSchema,
  buildParamsSchema,
  buildSettingsSchema,
  firmwareBuildSchema,
} from '../../shared/contracts/checks';
import { slugParamsSchema } from '../../shared/contracts/projects';
import type { AppContext } from '../context';
import type { ApiRoutes } from '../http/routes';
import { rateLimit } from '../middleware/rate-limit';
import { projectAccess, projectOf } from '../projects/access';
import * as service from './service';

export function registerBuildRoutes(routes: ApiRoutes, ctx: AppContext) {
  const writes = rateLimit(ctx, { name: 'writes', points: 300, durationSeconds: 60 });
  const reader = projectAccess('read');
  const editor = projectAccess('edit');
  const tag = 'builds';

  routes.get(
    '/projects/:slug/builds',
    {
      summary: "A project's firmware builds, oldest first, with memory use and deltas",
      tag,
      access: reader,
      params: slugParamsSchema,
      response: buildListSchema,
    },
    ({ locals }) => {
      const { project, role } = projectOf(locals);
      return service.listBuilds(ctx, project, role);
    },
  );

  routes.post(
    '/projects/:slug/builds',
    {
      summary: 'Add a firmware build from its GNU size report (editors; 400 size_report_invalid)',
      tag,
      access: editor,
      params: slugParamsSchema,
      body: buildCreateSchema,
      response: firmwareBuildSchema,
      status: 201,
      before: [writes],
    },
    ({ user, locals, body }) => {
      const { project, role } = projectOf(locals);
      return service.createBuild(ctx, user!, project, role, body);
    },
  );

  // Declared before /:buildId so "settings" is never read as an id.
  routes.put(
    '/projects/:slug/builds/settings',
    {
      summary: 'Set the memory warning threshold of the project (editors)',
      tag,
      access: editor,
      params: slugParamsSchema,
      body: buildSettingsSchema,
      response: buildListSchema,
      before: [writes],
    },
    ({ locals, body }) => {
      const { project, role } = projectOf(locals);
      return service.saveSettings(ctx, project, role, body);
    },
  );

  routes.delete(
    '/projects/:slug/builds/:buildId',
    {
      summary: 'Delete a firmware build (editors)',
      tag,
      access: editor,
      params: buildParamsSchema,
      status: 204,
      before: [writes],
    },
    async ({ locals, params }) => {
      await service.deleteBuild(ctx, projectOf(locals).project, params.buildId);
    },
  );
}
