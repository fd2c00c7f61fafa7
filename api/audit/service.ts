/**
 * Reading the audit log. Moderators and admins search all of it; the author of a piece of
 * content and the owner of its project read that content's moderation history, without the
 * names of the moderators who acted (they act for the site, and are spared retaliation).
 */
import type { z } from 'zod';
import type { AuditEntryView, AuditList, auditQuerySchema } from '../../shared/contracts/moderation';
import type { AppContext } from '../context';
import { fail } from '../http/errors';
import type { AuthUser } from '../http/routes';
import { loadTarget, type TargetRef } from '../moderation/targets';
import { isModerator } from '../moderation/visibility';
import * as q from './queries';

export const AUDIT_PAGE_SIZE = 50;

type Row = Awaited<ReturnType<typeof q.listAudit>>['rows'][number];

function toEntry(row: Row, showActor: boolean): AuditEntryView {
  const e = row.entry;
  return {
    id: e.id,
    action: e.action,
    actor: showActor && row.actor ? row.actor : null,
    targetKind: e.targetKind,
    targetId: e.targetId,
    projectId: e.projectId,
    before: e.before,
    after: e.after,
    reason: e.reason,
    at: e.at.toISOString(),
  };
}

export async function searchAudit(ctx: AppContext, query: z.output<typeof auditQuerySchema>): Promise<AuditList> {
  const page = query.page;
  const { rows, total } = await q.listAudit(ctx.db, {
    q: query.q || undefined,
    action: query.action,
    actorHandle: query.actor,
    targetKind: query.targetKind,
    targetId: query.targetId,
    limit: AUDIT_PAGE_SIZE,
    offset: (page - 1) * AUDIT_PAGE_SIZE,
  });
  return { items: rows.map((r) => toEntry(r, true)), total, page, pageSize: AUDIT_PAGE_SIZE };
}

export async function auditForTarget(ctx: AppContext, user: AuthUser, ref: TargetRef): Promise<AuditList> {
  const moderator = isModerator(user);
  const target = await loadTarget(ctx.db, ref);
  if (!target) throw fail.notFound('The content');
  if (!moderator) {
    const responsible = target.authorId === user.id || target.project?.ownerId === user.id;
    if (!responsible)
      throw fail.forbidden("Only moderators, the content's author and the project's owner can read this.");
  }
  const { rows, total } = await q.listAudit(ctx.db, {
    targetKind: ref.kind,
    targetId: String(ref.id),
    limit: 200,
    offset: 0,
  });
  return { items: rows.map((r) => toEntry(r, moderator)), total, page: 1, pageSize: 200 };
}
