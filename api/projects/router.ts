import { z } from 'zod';
import {
  boardRevisionInputSchema,
  boardRevisionParamsSchema,
  boardRevisionSchema,
  createProjectSchema,
  deleteProjectSchema,
  deletedProjectListSchema,
  editorInputSchema,
  editorParamsSchema,
  projectDetailSchema,
  projectListQuerySchema,
  projectListSchema,
  projectRevisionParamsSchema,
  projectSaveResultSchema,
  restoreSchema,
  revisionDetailSchema,
  revisionListSchema,
  slugParamsSchema,
  updateProjectSchema,
} from '../../shared/contracts/projects';
import { slugSchema } from '../../shared/text';
import type { AppContext } from '../context';
import { access, type ApiRoutes } from '../http/routes';
import { rateLimit } from '../middleware/rate-limit';
import { baseRevisionOf } from '../revisions/versioned';
import { projectAccess, projectOf } from './access';
import * as service from './service';

export function registerProjectRoutes(routes: ApiRoutes, ctx: AppContext) {
  const writes = rateLimit(ctx, { name: 'writes', points: 300, durationSeconds: 60 });
  const reader = projectAccess('read');
  const editor = projectAccess('edit');
  const owner = projectAccess('own');
  const tag = 'projects';

  routes.get(
    '/projects',
    { summary: 'Published projects, most recently updated first', tag, access: access.public, query: projectListQuerySchema, response: projectListSchema },
    ({ query }) => service.listPublishedProjects(ctx, query.page),
  );

  routes.get(
    '/me/projects',
    { summary: 'Projects you own or edit, drafts included', tag, access: access.signedIn, response: projectListSchema },
    ({ user }) => service.listMyProjects(ctx, user!),
  );

  routes.post(
    '/projects',
    {
      summary: 'Create a project (you become its owner)',
      tag,
      access: access.signedIn,
      body: createProjectSchema,
      response: projectDetailSchema,
      status: 201,
      before: [writes],
    },
    ({ user, body }) => service.createProject(ctx, user!, body),
  );

  routes.get(
    '/projects/:slug',
    { summary: 'A project with its write-up, build log and board revisions', tag, access: reader, params: slugParamsSchema, response: projectDetailSchema },
    ({ locals, user }) => {
      const { project, role } = projectOf(locals);
      return service.projectDetail(ctx, project, role, user);
    },
  );

  routes.put(
    '/projects/:slug',
    {
      summary: "Save the project's metadata (a new revision; needs baseRevision or If-Match)",
      tag,
      access: editor,
      params: slugParamsSchema,
      body: updateProjectSchema,
      response: projectSaveResultSchema,
      before: [writes],
    },
    ({ user, locals, body, req }) => {
      const { project, role } = projectOf(locals);
      const { baseRevision, ...input } = body;
      return service.updateProjectMeta(ctx, user!, project, role, input, baseRevisionOf(baseRevision, req.get('if-match')));
    },
  );

  routes.post(
    '/projects/:slug/publish',
    { summary: 'Publish the project', tag, access: editor, params: slugParamsSchema, response: projectDetailSchema, before: [writes] },
    ({ user, locals }) => {
      const { project, role } = projectOf(locals);
      return service.setPublished(ctx, user!, project, role, true);
    },
  );

  routes.post(
    '/projects/:slug/unpublish',
    { summary: 'Turn the project back into a draft', tag, access: editor, params: slugParamsSchema, response: projectDetailSchema, before: [writes] },
    ({ user, locals }) => {
      const { project, role } = projectOf(locals);
      return service.setPublished(ctx, user!, project, role, false);
    },
  );

  routes.delete(
    '/projects/:slug',
    {
      summary: `Delete the project (owner; an admin can restore it for ${service.RESTORE_DAYS} days)`,
      tag,
      access: owner,
      params: slugParamsSchema,
      body: deleteProjectSchema,
      status: 204,
    },
    async ({ user, locals, body }) => {
      await service.deleteProject(ctx, user!, projectOf(locals).project, body.confirmSlug);
    },
  );

  routes.get(
    '/projects/:slug/revisions',
    { summary: "History of the project's metadata", tag, access: reader, params: slugParamsSchema, response: revisionListSchema },
    ({ locals }) => service.projectRevisions(ctx, projectOf(locals).project),
  );

  routes.get(
    '/projects/:slug/revisions/:number',
    { summary: 'One revision of the metadata', tag, access: reader, params: projectRevisionParamsSchema, response: revisionDetailSchema },
    ({ locals, params }) => service.projectRevision(ctx, projectOf(locals).project, params.number),
  );

  routes.post(
    '/projects/:slug/restore',
    {
      summary: 'Restore an earlier metadata revision (creates a new revision)',
      tag,
      access: editor,
      params: slugParamsSchema,
      body: restoreSchema,
      response: projectSaveResultSchema,
      before: [writes],
    },
    ({ user, locals, body, req }) => {
      const { project, role } = projectOf(locals);
      return service.restoreProjectRevision(
        ctx,
        user!,
        project,
        role,
        body.number,
        baseRevisionOf(body.baseRevision, req.get('if-match')),
        body.message,
      );
    },
  );

  routes.post(
    '/projects/:slug/editors',
    { summary: 'Add an editor by handle (owner)', tag, access: owner, params: slugParamsSchema, body: editorInputSchema, response: projectDetailSchema },
    ({ user, locals, body }) => service.addEditor(ctx, user!, projectOf(locals).project, body.handle),
  );

  routes.delete(
    '/projects/:slug/editors/:handle',
    { summary: 'Remove an editor (owner)', tag, access: owner, params: editorParamsSchema, response: projectDetailSchema },
    ({ user, locals, params }) => service.removeEditor(ctx, user!, projectOf(locals).project, params.handle),
  );

  routes.post(
    '/projects/:slug/board-revisions',
    {
      summary: 'Add a board revision',
      tag,
      access: editor,
      params: slugParamsSchema,
      body: boardRevisionInputSchema,
      response: boardRevisionSchema,
      status: 201,
      before: [writes],
    },
    ({ locals, body }) => service.addBoardRevision(ctx, projectOf(locals).project, body),
  );

  routes.put(
    '/projects/:slug/board-revisions/:boardId',
    {
      summary: 'Change a board revision',
      tag,
      access: editor,
      params: boardRevisionParamsSchema,
      body: boardRevisionInputSchema,
      response: boardRevisionSchema,
      before: [writes],
    },
    ({ locals, params, body }) => service.updateBoardRevision(ctx, projectOf(locals).project, params.boardId, body),
  );

  routes.delete(
    '/projects/:slug/board-revisions/:boardId',
    { summary: 'Remove a board revision', tag, access: editor, params: boardRevisionParamsSchema, status: 204 },
    async ({ locals, params }) => {
      await service.removeBoardRevision(ctx, projectOf(locals).project, params.boardId);
    },
  );

  routes.get(
    '/admin/projects/deleted',
    { summary: 'Deleted projects that can still be restored (admin)', tag: 'admin', access: access.admin, response: deletedProjectListSchema },
    () => service.listDeletedProjects(ctx),
  );

  routes.post(
    '/admin/projects/:slug/restore',
    {
      summary: 'Restore a deleted project (admin)',
      tag: 'admin',
      access: access.admin,
      params: z.strictObject({ slug: slugSchema }),
      response: projectDetailSchema,
    },
    ({ user, params }) => service.restoreDeletedProject(ctx, user!, params.slug),
  );
}
