import {
  lessonInputSchema,
  lessonListSchema,
  lessonParamsSchema,
  lessonSchema,
  saveLessonSchema,
} from '../../shared/contracts/errata';
import { saveOutcomeSchema, slugParamsSchema } from '../../shared/contracts/projects';
import { z } from 'zod';
import type { AppContext } from '../context';
import type { ApiRoutes } from '../http/routes';
import { rateLimit } from '../middleware/rate-limit';
import { projectAccess, projectOf } from '../projects/access';
import { baseRevisionOf } from '../revisions/versioned';
import * as service from './service';

export function registerLessonRoutes(routes: ApiRoutes, ctx: AppContext) {
  const writes = rateLimit(ctx, { name: 'writes', points: 300, durationSeconds: 60 });
  const reader = projectAccess('read');
  const editor = projectAccess('edit');
  const tag = 'lessons';

  routes.get(
    '/projects/:slug/lessons',
    {
      summary: "A project's lessons learned",
      tag,
      access: reader,
      params: slugParamsSchema,
      response: lessonListSchema,
    },
    ({ locals, user }) => {
      const { project, role } = projectOf(locals);
      return service.listLessons(ctx, project, role, user);
    },
  );

  routes.post(
    '/projects/:slug/lessons',
    {
      summary: 'Add a lesson (editors)',
      tag,
      access: editor,
      params: slugParamsSchema,
      body: lessonInputSchema,
      response: lessonSchema,
      status: 201,
      before: [writes],
    },
    ({ user, locals, body }) => service.createLesson(ctx, user!, projectOf(locals).project, body),
  );

  routes.put(
    '/projects/:slug/lessons/:lessonId',
    {
      summary: 'Save a lesson (needs baseRevision or If-Match)',
      tag,
      access: editor,
      params: lessonParamsSchema,
      body: saveLessonSchema,
      response: z.object({ outcome: saveOutcomeSchema, lesson: lessonSchema }),
      before: [writes],
    },
    ({ user, locals, params, body, req }) => {
      const { baseRevision, message, ...input } = body;
      return service.saveLesson(
        ctx,
        user!,
        projectOf(locals).project,
        params.lessonId,
        input,
        baseRevisionOf(baseRevision, req.get('if-match')),
        message,
      );
    },
  );

  routes.delete(
    '/projects/:slug/lessons/:lessonId',
    { summary: 'Remove a lesson', tag, access: editor, params: lessonParamsSchema, status: 204 },
    async ({ locals, params }) => {
      await service.removeLesson(ctx, projectOf(locals).project, params.lessonId);
    },
  );
}
