/**
 * Moderators keep the vocabulary clean: one tag for one idea. Every action runs in one
 * transaction that first locks the tag rows it changes (FOR UPDATE, id order; the tagging path
 * in service.ts takes FOR SHARE on the same rows), and writes its audit entry — with the tag
 * before and after — in that same transaction.
 */
import { and, eq } from 'drizzle-orm';
import type {
  TagCurationResult,
  TagEditInput,
  TagHistory,
  TagMergeInput,
  TagRejectInput,
} from '../../shared/contracts/tags';
import type { Tx } from '../../db/client';
import { tagAliases, tags } from '../../db/schema';
import { appendAudit } from '../audit/queries';
import type { AppContext } from '../context';
import { fail } from '../http/errors';
import type { AuthUser } from '../http/routes';
import { summarize, viewerOfUser } from './pages';
import * as q from './queries';

const none = () => ({ lessons: 0, errata: 0, projects: 0 });
const sizes = (m: Record<q.LinkKind, unknown[]>) => ({
  lessons: m.lessons.length,
  errata: m.errata.length,
  projects: m.projects.length,
});

/** The tag as the audit log records it. */
async function snapshot(tx: Tx, tag: q.TagRow) {
  const aliases = (await q.aliasesOf(tx, [tag.id])).get(tag.id) ?? [];
  const into = tag.mergedIntoId ? await q.findTagById(tx, tag.mergedIntoId) : undefined;
  return {
    slug: tag.slug,
    name: tag.name,
    description: tag.description,
    state: tag.state,
    mergedInto: into?.slug ?? null,
    aliases,
  };
}

/** Loads and locks the tag a curation route names by its own slug (404 otherwise). */
async function lockBySlug(
  tx: Tx,
  slug: string,
  extra: number[] = [],
): Promise<{ tag: q.TagRow; others: Map<number, q.TagRow> }> {
  const found = await q.findTagBySlug(tx, slug);
  if (!found) throw fail.notFound('The tag');
  const locked = await q.lockTags(tx, [found.id, ...extra]);
  return { tag: locked.get(found.id)!, others: locked };
}

async function result(
  ctx: AppContext,
  user: AuthUser,
  tagId: number,
  extra: Omit<TagCurationResult, 'tag'>,
  fallback?: q.TagRow,
): Promise<TagCurationResult> {
  const row = (await q.findTagById(ctx.db, tagId)) ?? fallback;
  if (!row) throw new Error(`tag ${tagId} vanished`);
  const summary = (await summarize(ctx.db, viewerOfUser(user), [row])).get(row.id)!;
  return { tag: summary, ...extra };
}

async function setState(
  ctx: AppContext,
  user: AuthUser,
  slug: string,
  action: 'approve' | 'deprecate' | 'undeprecate',
  reason: string,
): Promise<TagCurationResult> {
  const rule = {
    approve: { from: 'pending', to: 'approved', wrong: 'Only a pending tag can be approved.' },
    deprecate: { from: 'approved', to: 'deprecated', wrong: 'Only an approved tag can be deprecated.' },
    undeprecate: { from: 'deprecated', to: 'approved', wrong: 'Only a deprecated tag can be undeprecated.' },
  }[action];
  const id = await ctx.db.transaction(async (tx) => {
    const { tag } = await lockBySlug(tx, slug);
    if (tag.mergedIntoId) throw fail.conflict('This tag was merged into another; unmerge it first.');
    if (tag.state !== rule.from) throw fail.conflict(rule.wrong, { state: tag.state });
    const before = await snapshot(tx, tag);
    const [after] = await tx
      .update(tags)
      .set({ state: rule.to as q.TagRow['state'], updatedAt: new Date() })
      .where(eq(tags.id, tag.id))
      .returning();
    await appendAudit(tx, {
      actorId: user.id,
      action: `tag.${action}`,
      targetKind: 'tag',
      targetId: tag.id,
      before,
      after: await snapshot(tx, after!),
      reason,
    });
    return tag.id;
  });
  return result(ctx, user, id, { mergedInto: null, retagged: none(), removed: false });
}

export const approveTag = (ctx: AppContext, user: AuthUser, slug: string, reason: string) =>
  setState(ctx, user, slug, 'approve', reason);
export const deprecateTag = (ctx: AppContext, user: AuthUser, slug: string, reason: string) =>
  setState(ctx, user, slug, 'deprecate', reason);
export const undeprecateTag = (ctx: AppContext, user: AuthUser, slug: string, reason: string) =>
  setState(ctx, user, slug, 'undeprecate', reason);

/** Resolves a target slug (its own slug or an alias) to a live tag, without following merges. */
async function targetOf(tx: Tx, slug: string): Promise<q.TagRow> {
  const target = (await q.findTagBySlug(tx, slug)) ?? (await q.findAliasTarget(tx, slug));
  if (!target) throw fail.notFound('The tag to merge into');
  return target;
}

/** Shared by merge and reject-with-replacement: A's uses move to B, A's slug becomes B's alias. */
async function mergeInTx(
  tx: Tx,
  user: AuthUser,
  slug: string,
  intoSlug: string,
  action: 'merge' | 'reject',
  reason: string,
) {
  const wanted = await targetOf(tx, intoSlug);
  const { tag, others } = await lockBySlug(tx, slug, [wanted.id]);
  const into = others.get(wanted.id)!;
  if (into.id === tag.id) throw fail.conflict('A tag cannot be merged into itself.');
  if (tag.mergedIntoId) throw fail.conflict('This tag is already merged into another.');
  if (into.mergedIntoId) throw fail.conflict(`"${into.name}" is itself merged into another tag; pick that one.`);
  if (into.state !== 'approved')
    throw fail.conflict(`"${into.name}" is ${into.state}; merge only into an approved tag.`);
  if (action === 'reject' && tag.state !== 'pending') throw fail.conflict('Only a pending tag can be rejected.');
  const before = await snapshot(tx, tag);
  const { moved, collapsed } = await q.moveLinks(tx, tag.id, into.id);
  const [after] = await tx
    .update(tags)
    .set({ mergedIntoId: into.id, updatedAt: new Date() })
    .where(eq(tags.id, tag.id))
    .returning();
  const alias = await tx
    .insert(tagAliases)
    .values({ alias: tag.slug, tagId: into.id })
    .onConflictDoNothing()
    .returning({ alias: tagAliases.alias });
  await tx.update(tags).set({ updatedAt: new Date() }).where(eq(tags.id, into.id));
  await q.enqueueProjects(tx, [...moved.projects, ...collapsed.projects.map((c) => c.subjectId)]);
  const record: q.MergeRecord = { into: into.slug, intoId: into.id, aliasAdded: alias.length === 1, moved, collapsed };
  await appendAudit(tx, {
    actorId: user.id,
    action: `tag.${action}`,
    targetKind: 'tag',
    targetId: tag.id,
    before,
    after: { ...(await snapshot(tx, after!)), ...record },
    reason,
  });
  return {
    id: tag.id,
    into: into.slug,
    retagged: {
      lessons: moved.lessons.length + collapsed.lessons.length,
      errata: moved.errata.length + collapsed.errata.length,
      projects: moved.projects.length + collapsed.projects.length,
    },
  };
}

export async function mergeTag(
  ctx: AppContext,
  user: AuthUser,
  slug: string,
  input: TagMergeInput & { reason: string },
) {
  const done = await ctx.db.transaction((tx) => mergeInTx(tx, user, slug, input.into, 'merge', input.reason));
  return result(ctx, user, done.id, { mergedInto: done.into, retagged: done.retagged, removed: false });
}

export async function rejectTag(
  ctx: AppContext,
  user: AuthUser,
  slug: string,
  input: TagRejectInput & { reason: string },
): Promise<TagCurationResult> {
  if (input.replaceWith) {
    const replaceWith = input.replaceWith;
    const done = await ctx.db.transaction((tx) => mergeInTx(tx, user, slug, replaceWith, 'reject', input.reason));
    return result(ctx, user, done.id, { mergedInto: done.into, retagged: done.retagged, removed: false });
  }
  const { row, uses } = await ctx.db.transaction(async (tx) => {
    const { tag } = await lockBySlug(tx, slug);
    if (tag.mergedIntoId) throw fail.conflict('This tag is already merged into another.');
    if (tag.state !== 'pending') throw fail.conflict('Only a pending tag can be rejected.', { state: tag.state });
    const before = await snapshot(tx, tag);
    const used = await q.usesOf(tx, tag.id);
    // The links go with the tag (ON DELETE CASCADE); their triggers queue the content for search.
    await q.enqueueProjects(tx, used.projects);
    await tx.delete(tags).where(eq(tags.id, tag.id));
    await appendAudit(tx, {
      actorId: user.id,
      action: 'tag.reject',
      targetKind: 'tag',
      targetId: tag.id,
      before: { ...before, uses: used },
      after: null,
      reason: input.reason,
    });
    return { row: tag, uses: used };
  });
  return {
    tag: {
      slug: row.slug,
      name: row.name,
      description: row.description,
      state: row.state,
      aliases: [],
      counts: { lessons: 0, errata: 0, projects: 0, total: 0 },
      createdAt: row.createdAt.toISOString(),
      updatedAt: row.updatedAt.toISOString(),
    },
    mergedInto: null,
    retagged: sizes(uses),
    removed: true,
  };
}

export async function unmergeTag(
  ctx: AppContext,
  user: AuthUser,
  slug: string,
  reason: string,
): Promise<TagCurationResult> {
  const done = await ctx.db.transaction(async (tx) => {
    const found = await q.findTagBySlug(tx, slug);
    if (!found) throw fail.notFound('The tag');
    if (!found.mergedIntoId) throw fail.conflict('This tag is not merged into another.');
    const locked = await q.lockTags(tx, [found.id, found.mergedIntoId]);
    const tag = locked.get(found.id)!;
    if (!tag.mergedIntoId) throw fail.conflict('This tag is not merged into another.');
    const into = locked.get(tag.mergedIntoId) ?? (await q.findTagById(tx, tag.mergedIntoId));
    if (!into) throw new Error(`tag ${tag.id} is merged into a missing tag`);
    const before = await snapshot(tx, tag);
    const record = await q.lastMergeEntry(tx, tag.id);
    const restored = await q.restoreLinks(tx, tag.id, into.id, record?.intoId === into.id ? record : undefined);
    await tx.delete(tagAliases).where(and(eq(tagAliases.alias, tag.slug), eq(tagAliases.tagId, into.id)));
    const [after] = await tx
      .update(tags)
      .set({ mergedIntoId: null, updatedAt: new Date() })
      .where(eq(tags.id, tag.id))
      .returning();
    await tx.update(tags).set({ updatedAt: new Date() }).where(eq(tags.id, into.id));
    await q.enqueueProjects(tx, restored.projects);
    await appendAudit(tx, {
      actorId: user.id,
      action: 'tag.unmerge',
      targetKind: 'tag',
      targetId: tag.id,
      before,
      after: { ...(await snapshot(tx, after!)), from: into.slug, restored },
      reason,
    });
    return { id: tag.id, retagged: sizes(restored) };
  });
  return result(ctx, user, done.id, { mergedInto: null, retagged: done.retagged, removed: false });
}

export async function editTag(
  ctx: AppContext,
  user: AuthUser,
  slug: string,
  input: TagEditInput & { reason: string },
): Promise<TagCurationResult> {
  const id = await ctx.db.transaction(async (tx) => {
    const { tag } = await lockBySlug(tx, slug);
    if (tag.mergedIntoId) throw fail.conflict('This tag was merged into another; edit that one.');
    const before = await snapshot(tx, tag);
    const newSlug = input.slug && input.slug !== tag.slug ? input.slug : null;
    if (newSlug) {
      const taken = await q.slugOrAliasTaken(tx, newSlug);
      // Renaming back to one of its own old slugs is fine: that alias simply goes away.
      if (taken && !(taken.as === 'alias' && taken.tagId === tag.id)) {
        throw fail.conflict(`The slug "${newSlug}" is already used by a tag.`, { path: 'slug' });
      }
      await tx.delete(tagAliases).where(eq(tagAliases.alias, newSlug));
      await tx.insert(tagAliases).values({ alias: tag.slug, tagId: tag.id }).onConflictDoNothing();
    }
    const [after] = await tx
      .update(tags)
      .set({
        ...(input.name !== undefined ? { name: input.name } : {}),
        ...(input.description !== undefined ? { description: input.description } : {}),
        ...(newSlug ? { slug: newSlug } : {}),
        updatedAt: new Date(),
      })
      .where(eq(tags.id, tag.id))
      .returning();
    await appendAudit(tx, {
      actorId: user.id,
      action: 'tag.edit',
      targetKind: 'tag',
      targetId: tag.id,
      before,
      after: await snapshot(tx, after!),
      reason: input.reason,
    });
    return tag.id;
  });
  return result(ctx, user, id, { mergedInto: null, retagged: none(), removed: false });
}

export async function tagHistory(ctx: AppContext, slug: string): Promise<TagHistory> {
  const tag = await q.findTagBySlug(ctx.db, slug);
  if (!tag) throw fail.notFound('The tag');
  const rows = await q.auditOfTag(ctx.db, tag.id);
  return {
    items: rows.map((r) => ({
      id: Number(r.id),
      action: r.action,
      actor: r.handle ? { handle: r.handle, displayName: r.displayName ?? r.handle } : null,
      before: r.before,
      after: r.after,
      reason: r.reason,
      at: r.at.toISOString(),
    })),
  };
}
