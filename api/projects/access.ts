/**
 * Access rules for everything under /projects/:slug. A draft is visible only to its owner and
 * editors (and admins); to anyone else it does not exist (404), so drafts leak nothing.
 */
import type { ProjectRole } from '../../shared/domain';
import { fail } from '../http/errors';
import type { AccessRule, RequestState } from '../http/routes';
import { hiddenError } from '../moderation/visibility';
import { findProjectBySlug, memberRole, type ProjectRow } from './queries';

/** read: anyone who can see it; participate: signed in and can see it (comment, propose, follow). */
export type ProjectNeed = 'read' | 'participate' | 'edit' | 'own';

export interface ProjectLocals {
  project: ProjectRow;
  role: ProjectRole | null;
}

export function canRead(project: ProjectRow, role: ProjectRole | null, siteRole: string | undefined): boolean {
  if (role || siteRole === 'admin') return true;
  // Moderators read what they hid (drafts included: only flagged content gets hidden).
  if (siteRole === 'moderator' && project.hiddenAt !== null) return true;
  return project.status === 'published' && project.hiddenAt === null;
}

/**
 * Refuses a reader who may not read the project: a hidden published project answers 410 with
 * the moderators' public reason, anything else they may not see does not exist (404).
 */
export function refuseUnreadable(
  project: ProjectRow,
  role: ProjectRole | null,
  siteRole: string | undefined,
  what: string,
) {
  if (canRead(project, role, siteRole)) return;
  if (project.status === 'published' && project.hiddenAt !== null) throw hiddenError(what, project);
  throw fail.notFound(what);
}

export function projectAccess(need: ProjectNeed): AccessRule {
  return {
    name: {
      read: 'project reader',
      participate: 'signed-in project reader',
      edit: 'project editor or owner',
      own: 'project owner',
    }[need],
    allowsAnonymous: need === 'read',
    async check(state: RequestState) {
      if (need !== 'read' && !state.user) throw fail.unauthenticated();
      const slug = state.req.params.slug;
      const project = typeof slug === 'string' ? await findProjectBySlug(state.ctx.db, slug) : undefined;
      if (!project) throw fail.notFound('The project');
      const role = state.user ? await memberRole(state.ctx.db, project.id, state.user.id) : null;
      refuseUnreadable(project, role, state.user?.role, 'The project');
      if (need === 'edit' && !role) throw fail.forbidden('Only the owner and editors of this project can change it.');
      if (need === 'own' && role !== 'owner') throw fail.forbidden('Only the owner of this project can do this.');
      const locals: ProjectLocals = { project, role };
      Object.assign(state.locals, locals);
    },
  };
}

/** The project and the viewer's role, as the access rule resolved them. */
export function projectOf(locals: Record<string, unknown>): ProjectLocals {
  const { project, role } = locals as unknown as ProjectLocals;
  if (!project) throw new Error('projectOf() used on a route without a project access rule');
  return { project, role };
}
