/**
 * The moderation queue and what moderators do with it: hide content (with a public reason),
 * restore it, or dismiss a flag. Each action closes the flags it answers and writes one audit
 * entry in the same transaction.
 */
import type {
  FlagGroup,
  FlagQueue,
  FlagState,
  ModerationActionResult,
  ModerationTarget,
  ModerationTargetDetail,
  QueueFlag,
} from '../../shared/contracts/moderation';
import type { FlagReason } from '../../shared/domain';
import { appendAudit } from '../audit/queries';
import type { AppContext } from '../context';
import { toFlag } from '../flags/present';
import { fail } from '../http/errors';
import type { AuthUser } from '../http/routes';
import { memberRole } from '../projects/queries';
import * as q from './queries';
import {
  bumpProjectPage,
  loadTarget,
  loadTargets,
  lockTarget,
  setHidden,
  targetKey,
  type LoadedTarget,
  type TargetRef,
} from './targets';
import { isModerator, type Reader } from './visibility';

export type TargetKind = TargetRef['kind'];

export const QUEUE_PAGE_SIZE = 20;

/** Who the user is to this target, and whether they may read it at all (drafts, hidden projects). */
export async function readerOfTarget(
  ctx: AppContext,
  user: AuthUser | null,
  target: LoadedTarget,
): Promise<Reader & { canRead: boolean }> {
  const projectRole = user && target.projectId !== null ? await memberRole(ctx.db, target.projectId, user.id) : null;
  const reader: Reader = { user, projectRole };
  const project = target.project;
  let canRead: boolean;
  if (!project) canRead = isModerator(user) || (user !== null && user.id === target.authorId);
  else if (projectRole || isModerator(user)) canRead = true;
  else canRead = project.status === 'published' && project.hiddenAt === null;
  return { ...reader, canRead };
}

function toQueueFlag(row: q.FlagJoinRow): QueueFlag {
  return {
    ...toFlag({
      id: row.id,
      targetKind: row.target_kind,
      targetId: row.target_id,
      reason: row.reason as FlagReason,
      text: row.text,
      state: row.state as FlagState,
      createdAt: new Date(row.created_at),
      handledAt: row.handled_at ? new Date(row.handled_at) : null,
      projectId: null,
      authorId: row.author_id,
      handledBy: row.handler_id,
    }),
    author: {
      id: row.author_id,
      handle: row.author_handle,
      displayName: row.author_display_name,
      avatarUrl: row.author_avatar_url,
    },
    handledBy:
      row.handler_id !== null
        ? {
            id: row.handler_id,
            handle: row.handler_handle!,
            displayName: row.handler_display_name!,
            avatarUrl: row.handler_avatar_url,
          }
        : null,
  };
}

/** What the queue shows for a target that no longer exists (its project was deleted). */
function goneTarget(ref: TargetRef): ModerationTarget {
  return {
    kind: ref.kind,
    id: ref.id,
    title: 'Removed content',
    excerpt: '',
    project: null,
    author: null,
    link: null,
    hidden: null,
  };
}

export async function flagQueue(ctx: AppContext, state: FlagState, page: number): Promise<FlagQueue> {
  const { rows, total } = await q.flagGroups(ctx.db, state, QUEUE_PAGE_SIZE, (page - 1) * QUEUE_PAGE_SIZE);
  const refs = rows.map((r) => ({ kind: r.targetKind, id: r.targetId }) as TargetRef);
  const [targets, flagRows] = await Promise.all([loadTargets(ctx.db, refs), q.flagsOn(ctx.db, refs, state)]);
  const flagsByKey = new Map<string, QueueFlag[]>();
  for (const row of flagRows) {
    const key = targetKey({ kind: row.target_kind as TargetRef['kind'], id: row.target_id });
    flagsByKey.set(key, [...(flagsByKey.get(key) ?? []), toQueueFlag(row)]);
  }
  const items: FlagGroup[] = rows.map((r, i) => {
    const key = targetKey(refs[i]!);
    const list = flagsByKey.get(key) ?? [];
    const counts = new Map<FlagReason, number>();
    for (const f of list) counts.set(f.reason, (counts.get(f.reason) ?? 0) + 1);
    return {
      target: targets.get(key)?.view ?? goneTarget(refs[i]!),
      flagCount: r.flagCount,
      reasons: [...counts].map(([reason, count]) => ({ reason, count })).sort((a, b) => b.count - a.count),
      flags: list,
      firstFlaggedAt: new Date(r.firstAt).toISOString(),
      lastFlaggedAt: new Date(r.lastAt).toISOString(),
    };
  });
  return { items, total, page, pageSize: QUEUE_PAGE_SIZE };
}

async function existing(ctx: AppContext, ref: TargetRef): Promise<LoadedTarget> {
  const target = await loadTarget(ctx.db, ref);
  if (!target) throw fail.notFound('The content');
  return target;
}

export async function targetDetail(ctx: AppContext, ref: TargetRef): Promise<ModerationTargetDetail> {
  const target = await existing(ctx, ref);
  const rows = await q.flagsOn(ctx.db, [ref]);
  return { target: target.view, flags: rows.map(toQueueFlag) };
}

/** Hides (`reason` given) or restores (`reason` null) the target, closing its open flags. */
async function setVisibility(
  ctx: AppContext,
  moderator: AuthUser,
  ref: TargetRef,
  hide: { publicReason: string } | null,
  note: string,
): Promise<ModerationActionResult> {
  const before = await existing(ctx, ref);
  const actioned = await ctx.db.transaction(async (tx) => {
    const locked = await lockTarget(tx, ref);
    if (!locked) throw fail.notFound('The content');
    if (hide && locked.hiddenAt) throw fail.conflict('This content is already hidden.');
    if (!hide && !locked.hiddenAt) throw fail.conflict('This content is not hidden.');
    await setHidden(tx, ref, hide ? hide.publicReason : null);
    const flagIds = await q.actionOpenFlags(tx, ref, moderator.id);
    if (before.projectId !== null && ['project', 'document', 'upload'].includes(ref.kind)) {
      await bumpProjectPage(tx, before.projectId);
    }
    await appendAudit(tx, {
      actorId: moderator.id,
      action: hide ? 'content.hide' : 'content.restore',
      targetKind: ref.kind,
      targetId: ref.id,
      projectId: before.projectId,
      before: { hidden: before.hiddenAt ? { reason: before.hiddenReason ?? '' } : null, openFlags: flagIds },
      after: { hidden: hide ? { reason: hide.publicReason } : null, openFlags: [] },
      reason: hide ? hide.publicReason : note,
    });
    return flagIds.length;
  });
  const after = await existing(ctx, ref);
  return { target: after.view, actionedFlags: actioned };
}

export function hideTarget(ctx: AppContext, moderator: AuthUser, ref: TargetRef, reason: string) {
  return setVisibility(ctx, moderator, ref, { publicReason: reason }, '');
}

export function restoreTarget(ctx: AppContext, moderator: AuthUser, ref: TargetRef, reason: string) {
  return setVisibility(ctx, moderator, ref, null, reason);
}

export async function dismissFlag(ctx: AppContext, moderator: AuthUser, flagId: number, reason: string) {
  const row = await ctx.db.transaction(async (tx) => {
    const flag = await q.lockFlag(tx, flagId);
    if (!flag) throw fail.notFound('The flag');
    if (flag.state !== 'open') throw fail.conflict(`This flag is already ${flag.state}.`);
    const dismissed = await q.dismissFlag(tx, flagId, moderator.id);
    await appendAudit(tx, {
      actorId: moderator.id,
      action: 'flag.dismiss',
      targetKind: flag.targetKind,
      targetId: flag.targetId,
      projectId: flag.projectId,
      before: { flag: { id: flag.id, state: flag.state, reason: flag.reason } },
      after: { flag: { id: flag.id, state: dismissed.state, reason: flag.reason } },
      reason,
    });
    return dismissed;
  });
  return toFlag(row);
}
