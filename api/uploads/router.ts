import { z } from 'zod';
import { projectDetailSchema, slugParamsSchema } from '../../shared/contracts/projects';
import {
  setCoverSchema,
  updateUploadSchema,
  uploadListSchema,
  uploadParamsSchema,
  uploadSchema,
} from '../../shared/contracts/uploads';
import type { AppContext } from '../context';
import type { ApiRoutes } from '../http/routes';
import { memberBudgets, rateLimit } from '../middleware/rate-limit';
import { projectAccess, projectOf } from '../projects/access';
import { findProjectById } from '../projects/queries';
import { projectDetail } from '../projects/service';
import { fail } from '../http/errors';
import { uploadAccess, uploadOf } from './access';
import { FILE_FIELD, MAX_FILES, incomingOf, multipartFiles } from './multipart';
import * as service from './service';

// Any name parses; one the upload does not have is a 404 (service.resolveFile).
const fileParamsSchema = uploadParamsSchema.extend({ file: z.string().max(64) });

export function registerUploadRoutes(routes: ApiRoutes, ctx: AppContext) {
  const uploadsPerMinute = rateLimit(ctx, memberBudgets.uploads);
  const writes = rateLimit(ctx, { name: 'writes', points: 300, durationSeconds: 60 });
  const tag = 'uploads';

  routes.post(
    '/projects/:slug/uploads',
    {
      summary: `Upload photos or files to a project (multipart, field "${FILE_FIELD}", up to ${MAX_FILES} files; optional altText and caption)`,
      tag,
      access: projectAccess('edit'),
      params: slugParamsSchema,
      streamBody: {
        contentType: 'multipart/form-data',
        schema: z.object({
          file: z.array(z.string()).max(MAX_FILES).describe('the files (binary)'),
          altText: z.string().max(300).optional(),
          caption: z.string().max(300).optional(),
        }),
        read: multipartFiles(ctx.config),
      },
      response: z.object({ items: z.array(uploadSchema) }),
      status: 201,
      before: [uploadsPerMinute],
    },
    ({ user, locals, res }) => service.uploadFiles(ctx, user!, projectOf(locals).project, incomingOf(res)),
  );

  routes.get(
    '/projects/:slug/uploads',
    {
      summary: "A project's photos and files (editors also see those still processing or failed)",
      tag,
      access: projectAccess('read'),
      params: slugParamsSchema,
      response: uploadListSchema,
    },
    ({ locals, user }) => {
      const { project, role } = projectOf(locals);
      return service.galleryOf(ctx, project, role, user);
    },
  );

  routes.put(
    '/projects/:slug/cover',
    {
      summary: "Choose the project's cover photo (a ready photo of the project) or none",
      tag,
      access: projectAccess('edit'),
      params: slugParamsSchema,
      body: setCoverSchema,
      response: projectDetailSchema,
      before: [writes],
    },
    async ({ locals, body }) => {
      const { project, role } = projectOf(locals);
      await service.setCoverPhoto(ctx, project, body.uploadId);
      const fresh = await findProjectById(ctx.db, project.id);
      if (!fresh) throw fail.notFound('The project');
      return projectDetail(ctx, fresh, role);
    },
  );

  routes.get(
    '/uploads/:uploadId',
    { summary: 'One upload (poll until its state is ready or failed)', tag, access: uploadAccess('read'), params: uploadParamsSchema, response: uploadSchema },
    ({ locals }) => service.presentOne(ctx, uploadOf(locals).upload),
  );

  routes.patch(
    '/uploads/:uploadId',
    {
      summary: "Change an upload's alt text or caption",
      tag,
      access: uploadAccess('edit'),
      params: uploadParamsSchema,
      body: updateUploadSchema,
      response: uploadSchema,
      before: [writes],
    },
    ({ locals, body }) => service.updateTexts(ctx, uploadOf(locals).upload, body),
  );

  routes.delete(
    '/uploads/:uploadId',
    { summary: 'Remove an upload nothing uses any more (409 while content or the cover uses it)', tag, access: uploadAccess('edit'), params: uploadParamsSchema, status: 204 },
    async ({ locals }) => {
      await service.removeUpload(ctx, uploadOf(locals).upload);
    },
  );

  routes.get(
    '/uploads/:uploadId/:file',
    {
      summary: 'A stored file: original.<ext>, or a variant such as page.webp or thumb.jpg',
      tag,
      access: uploadAccess('read'),
      params: fileParamsSchema,
      produces: 'application/octet-stream',
    },
    async ({ req, res, locals, params }) => {
      const { upload, project } = uploadOf(locals);
      await service.serveFile(ctx, req, res, upload, project, params.file);
    },
  );
}
