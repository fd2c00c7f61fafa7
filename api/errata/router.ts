import { z } from 'zod';
import {
  categoryListSchema,
  commentInputSchema,
  commentListSchema,
  commentSchema,
  createErratumSchema,
  erratumDetailSchema,
  erratumListSchema,
  erratumParamsSchema,
  erratumRevisionParamsSchema,
  erratumSaveResultSchema,
  saveErratumSchema,
} from '../../shared/contracts/errata';
import {
  restoreSchema,
  revisionDetailSchema,
  revisionListSchema,
  slugParamsSchema,
} from '../../shared/contracts/projects';
import { listComments } from '../comments/service';
import type { AppContext } from '../context';
import { access, type ApiRoutes } from '../http/routes';
import { memberBudgets, rateLimit } from '../middleware/rate-limit';
import { projectAccess, projectOf } from '../projects/access';
import { baseRevisionOf } from '../revisions/versioned';
import { listCategories } from './queries';
import * as service from './service';
import { commentOnErratum } from './notify';

export function registerErrataRoutes(routes: ApiRoutes, ctx: AppContext) {
  const writes = rateLimit(ctx, { name: 'writes', points: 300, durationSeconds: 60 });
  const comments = rateLimit(ctx, memberBudgets.comments);
  const reader = projectAccess('read');
  const participant = projectAccess('participate');
  const editor = projectAccess('edit');
  const tag = 'errata';

  routes.get(
    '/categories',
    { summary: 'Erratum categories', tag, access: access.public, response: categoryListSchema },
    async () => ({ items: await listCategories(ctx.db) }),
  );

  routes.get(
    '/projects/:slug/errata',
    {
      summary: "A project's errata, with its board revisions and the categories",
      tag,
      access: reader,
      params: slugParamsSchema,
      response: erratumListSchema,
    },
    ({ user, locals }) => {
      const { project, role } = projectOf(locals);
      return service.listProjectErrata(ctx, project, role, user);
    },
  );

  routes.get(
    '/projects/:slug/errata.md',
    {
      summary: "The project's errata as Markdown (optionally only those affecting ?board=<id>)",
      tag,
      access: reader,
      params: slugParamsSchema,
      query: z.strictObject({ board: z.coerce.number().int().min(1).optional() }),
      produces: 'text/markdown',
    },
    async ({ locals, query, res }) => {
      const { project } = projectOf(locals);
      const markdown = await service.errataMarkdown(ctx, project, query.board);
      res
        .type('text/markdown; charset=utf-8')
        .set('Content-Disposition', `attachment; filename="${project.slug}-errata.md"`)
        .set('X-Content-Type-Options', 'nosniff')
        .send(markdown);
    },
  );

  routes.post(
    '/projects/:slug/errata',
    {
      summary: 'Record an erratum (editors)',
      tag,
      access: editor,
      params: slugParamsSchema,
      body: createErratumSchema,
      response: erratumDetailSchema,
      status: 201,
      before: [writes],
    },
    ({ user, locals, body }) => {
      const { project, role } = projectOf(locals);
      const { tags, message, ...fields } = body;
      return service.createErratum(ctx, user!, project, role, { tags, message }, fields);
    },
  );

  routes.get(
    '/projects/:slug/errata/:number',
    { summary: 'One erratum', tag, access: reader, params: erratumParamsSchema, response: erratumDetailSchema },
    async ({ user, locals, params, res }) => {
      const { project, role } = projectOf(locals);
      const erratum = await service.getErratum(ctx, project, role, user, params.number);
      res.set('ETag', `"${erratum.revision}"`);
      return erratum;
    },
  );

  routes.put(
    '/projects/:slug/errata/:number',
    {
      summary: 'Save an erratum (a new revision; needs baseRevision or If-Match; merges or answers 409)',
      tag,
      access: editor,
      params: erratumParamsSchema,
      body: saveErratumSchema,
      response: erratumSaveResultSchema,
      before: [writes],
    },
    async ({ user, locals, params, body, req, res }) => {
      const { project, role } = projectOf(locals);
      const { tags, message, baseRevision, ...fields } = body;
      const result = await service.saveErratum(
        ctx,
        user!,
        project,
        role,
        params.number,
        fields,
        {
          baseRevision: baseRevisionOf(baseRevision, req.get('if-match')),
          message,
          tags,
        },
      );
      res.set('ETag', `"${result.erratum.revision}"`);
      return result;
    },
  );

  routes.get(
    '/projects/:slug/errata/:number/revisions',
    {
      summary: 'History of an erratum, newest first',
      tag,
      access: reader,
      params: erratumParamsSchema,
      response: revisionListSchema,
    },
    ({ locals, params, user }) => {
      const { project, role } = projectOf(locals);
      return service.erratumRevisions(ctx, project, params.number, { user, projectRole: role });
    },
  );

  routes.get(
    '/projects/:slug/errata/:number/revisions/:revision',
    {
      summary: 'One revision of an erratum (fields as in the API)',
      tag,
      access: reader,
      params: erratumRevisionParamsSchema,
      response: revisionDetailSchema,
    },
    ({ locals, params, user }) => {
      const { project, role } = projectOf(locals);
      return service.erratumRevision(ctx, project, params.number, params.revision, { user, projectRole: role });
    },
  );

  routes.post(
    '/projects/:slug/errata/:number/restore',
    {
      summary: 'Restore an earlier revision of an erratum (creates a new revision)',
      tag,
      access: editor,
      params: erratumParamsSchema,
      body: restoreSchema,
      response: erratumSaveResultSchema,
      before: [writes],
    },
    ({ user, locals, params, body, req }) => {
      const { project, role } = projectOf(locals);
      return service.restoreErratumRevision(
        ctx,
        user!,
        project,
        role,
        params.number,
        body.number,
        baseRevisionOf(body.baseRevision, req.get('if-match')),
        body.message,
      );
    },
  );

  routes.get(
    '/projects/:slug/errata/:number/comments',
    {
      summary: 'Discussion on an erratum',
      tag,
      access: reader,
      params: erratumParamsSchema,
      response: commentListSchema,
    },
    async ({ user, locals, params }) => {
      const { project, role } = projectOf(locals);
      const erratum = await service.getErratum(ctx, project, role, user, params.number);
      return listComments(ctx, { erratumId: erratum.id }, user);
    },
  );

  routes.post(
    '/projects/:slug/errata/:number/comments',
    {
      summary: 'Comment on an erratum (signed-in members)',
      tag,
      access: participant,
      params: erratumParamsSchema,
      body: commentInputSchema,
      response: commentSchema,
      status: 201,
      before: [comments],
    },
    async ({ user, locals, params, body }) => {
      const { project, role } = projectOf(locals);
      const erratum = await service.getErratum(ctx, project, role, user, params.number);
      return commentOnErratum(ctx, project, user!, erratum, body.body);
    },
  );
}
