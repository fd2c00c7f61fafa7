import {
  documentDetailSchema,
  documentParamsSchema,
  documentSaveResultSchema,
  newLogEntrySchema,
  newSectionSchema,
  projectDetailSchema,
  restoreSchema,
  revisionDetailSchema,
  revisionListSchema,
  revisionParamsSchema,
  saveDocumentSchema,
  sectionOrderSchema,
  slugParamsSchema,
} from '../../shared/contracts/projects';
import type { AppContext } from '../context';
import type { ApiRoutes } from '../http/routes';
import { rateLimit } from '../middleware/rate-limit';
import { projectAccess, projectOf } from '../projects/access';
import { baseRevisionOf } from '../revisions/versioned';
import * as service from './service';

export function registerDocumentRoutes(routes: ApiRoutes, ctx: AppContext) {
  const writes = rateLimit(ctx, { name: 'writes', points: 300, durationSeconds: 60 });
  const reader = projectAccess('read');
  const editor = projectAccess('edit');
  const tag = 'write-ups';

  routes.post(
    '/projects/:slug/sections',
    {
      summary: 'Add a write-up section',
      tag,
      access: editor,
      params: slugParamsSchema,
      body: newSectionSchema,
      response: documentDetailSchema,
      status: 201,
      before: [writes],
    },
    ({ user, locals, body }) => {
      const { project, role } = projectOf(locals);
      return service.addSection(ctx, user!, project, role, body);
    },
  );

  routes.post(
    '/projects/:slug/log',
    {
      summary: 'Add a build-log entry',
      tag,
      access: editor,
      params: slugParamsSchema,
      body: newLogEntrySchema,
      response: documentDetailSchema,
      status: 201,
      before: [writes],
    },
    ({ user, locals, body }) => {
      const { project, role } = projectOf(locals);
      return service.addLogEntry(ctx, user!, project, role, body);
    },
  );

  routes.put(
    '/projects/:slug/sections/order',
    {
      summary: 'Reorder the write-up sections',
      tag,
      access: editor,
      params: slugParamsSchema,
      body: sectionOrderSchema,
      response: projectDetailSchema,
      before: [writes],
    },
    ({ user, locals, body }) => {
      const { project, role } = projectOf(locals);
      return service.reorderSections(ctx, user!, project, role, body.ids);
    },
  );

  routes.get(
    '/projects/:slug/documents/:documentId',
    { summary: 'A section or log entry (Markdown and rendered HTML)', tag, access: reader, params: documentParamsSchema, response: documentDetailSchema },
    async ({ locals, params, res, user }) => {
      const { project, role } = projectOf(locals);
      const doc = await service.getDocument(ctx, project, role, params.documentId, user);
      res.set('ETag', `"${doc.revision}"`);
      return doc;
    },
  );

  routes.put(
    '/projects/:slug/documents/:documentId',
    {
      summary: 'Save a section or log entry (needs baseRevision or If-Match; merges or answers 409 when it moved on)',
      tag,
      access: editor,
      params: documentParamsSchema,
      body: saveDocumentSchema,
      response: documentSaveResultSchema,
      before: [writes],
    },
    async ({ user, locals, params, body, req, res }) => {
      const { project, role } = projectOf(locals);
      const { baseRevision, ...input } = body;
      const result = await service.saveDocument(
        ctx,
        user!,
        project,
        role,
        params.documentId,
        input,
        baseRevisionOf(baseRevision, req.get('if-match')),
      );
      res.set('ETag', `"${result.document.revision}"`);
      return result;
    },
  );

  routes.delete(
    '/projects/:slug/documents/:documentId',
    { summary: 'Remove a section or log entry (its history is kept)', tag, access: editor, params: documentParamsSchema, status: 204 },
    async ({ locals, params }) => {
      await service.removeDocument(ctx, projectOf(locals).project, params.documentId);
    },
  );

  routes.get(
    '/projects/:slug/documents/:documentId/revisions',
    { summary: 'History of a section or log entry, newest first', tag, access: reader, params: documentParamsSchema, response: revisionListSchema },
    ({ locals, params, user }) => {
      const { project, role } = projectOf(locals);
      return service.documentRevisions(ctx, project, params.documentId, { user, projectRole: role });
    },
  );

  routes.get(
    '/projects/:slug/documents/:documentId/revisions/:number',
    { summary: 'One revision of a section or log entry', tag, access: reader, params: revisionParamsSchema, response: revisionDetailSchema },
    ({ locals, params, user }) => {
      const { project, role } = projectOf(locals);
      return service.documentRevision(ctx, project, params.documentId, params.number, { user, projectRole: role });
    },
  );

  routes.post(
    '/projects/:slug/documents/:documentId/restore',
    {
      summary: 'Restore an earlier revision (creates a new revision)',
      tag,
      access: editor,
      params: documentParamsSchema,
      body: restoreSchema,
      response: documentSaveResultSchema,
      before: [writes],
    },
    ({ user, locals, params, body, req }) => {
      const { project, role } = projectOf(locals);
      return service.restoreDocumentRevision(
        ctx,
        user!,
        project,
        role,
        params.documentId,
        body.number,
        baseRevisionOf(body.baseRevision, req.get('if-match')),
        body.message,
      );
    },
  );
}
