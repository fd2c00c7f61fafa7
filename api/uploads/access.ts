/**
 * Access to one upload follows the project it belongs to (api/projects/access.ts): whoever can
 * read the project can read its photos and files, and to anyone else they do not exist (404) — a
 * draft's photos are as private as the draft. Readers see only what content may show (not failed,
 * not hidden); the project's owner and editors see everything and are the only ones who change it.
 * The check runs on every request, file downloads included.
 *
 * OWASP File Upload Cheat Sheet, "User Permissions" (authorization to access the files); OWASP
 * ASVS 5.0 V8 (authorization, checked on every request).
 */
import type { ProjectRole } from '../../shared/domain';
import { fail } from '../http/errors';
import type { AccessRule, RequestState } from '../http/routes';
import { refuseHidden } from '../moderation/visibility';
import { refuseUnreadable } from '../projects/access';
import { findProjectById, memberRole, type ProjectRow } from '../projects/queries';
import type { UploadRow } from './present';
import { findUpload } from './queries';

export interface UploadLocals {
  upload: UploadRow;
  project: ProjectRow;
  role: ProjectRole | null;
}

export function uploadAccess(need: 'read' | 'edit'): AccessRule {
  return {
    name: need === 'read' ? 'reader of the upload’s project' : 'editor or owner of the upload’s project',
    allowsAnonymous: need === 'read',
    async check(state: RequestState) {
      if (need === 'edit' && !state.user) throw fail.unauthenticated();
      const raw = state.req.params.uploadId;
      const id = typeof raw === 'string' && /^\d{1,9}$/.test(raw) ? Number(raw) : NaN;
      const upload = Number.isInteger(id) ? await findUpload(state.ctx.db, id) : undefined;
      if (!upload || upload.projectId === null) throw fail.notFound('The file');
      const project = await findProjectById(state.ctx.db, upload.projectId);
      if (!project || project.deletedAt) throw fail.notFound('The file');
      const role = state.user ? await memberRole(state.ctx.db, project.id, state.user.id) : null;
      refuseUnreadable(project, role, state.user?.role, 'The file');
      if (!role && upload.state === 'failed') throw fail.notFound('The file');
      // Hidden by moderators: its uploader, the project's members and moderators still see it.
      refuseHidden(upload, { user: state.user, projectRole: role }, 'The file', { authorId: upload.ownerId });
      if (need === 'edit' && !role) throw fail.forbidden('Only the owner and editors of this project can change its files.');
      const locals: UploadLocals = { upload, project, role };
      Object.assign(state.locals, locals);
    },
  };
}

export function uploadOf(locals: Record<string, unknown>): UploadLocals {
  const { upload, project, role } = locals as unknown as UploadLocals;
  if (!upload) throw new Error('uploadOf() used on a route without an upload access rule');
  return { upload, project, role };
}
