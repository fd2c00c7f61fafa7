/**
 * Tags as members type them. A known name, slug or alias resolves to its tag (a merged tag to
 * the tag it was merged into); an unknown one is created as a pending tag by that member, so it
 * shows on their content at once and waits for a moderator. Deprecated tags take no new use.
 */
import { and, asc, eq, ilike, inArray, or, sql } from 'drizzle-orm';
import type { DbOrTx } from '../../db/client';
import { erratumTags, lessonTags, tagAliases, tags } from '../../db/schema';
import type { TagRef } from '../../shared/contracts/errata';
import { slugify } from '../../shared/text';
import type { AppContext } from '../context';
import { fail } from '../http/errors';
import type { AuthUser } from '../http/routes';

export function toTagRef(row: { slug: string; name: string; state: TagRef['state'] }): TagRef {
  return { slug: row.slug, name: row.name, state: row.state };
}

/** The tag ids a lesson or erratum carries now (a deprecated one among them may stay). */
export async function currentTagIds(db: DbOrTx, kind: 'lesson' | 'erratum', subjectId: number): Promise<number[]> {
  const table = kind === 'lesson' ? lessonTags : erratumTags;
  const rows = await db.select({ tagId: table.tagId }).from(table).where(eq(table.subjectId, subjectId));
  return rows.map((r) => r.tagId);
}

/** Locks tag rows against curation (FOR SHARE, id order) and returns them as they are now. */
async function shareLock(db: DbOrTx, ids: number[]) {
  if (!ids.length) return new Map<number, typeof tags.$inferSelect>();
  const rows = await db
    .select()
    .from(tags)
    .where(inArray(tags.id, [...new Set(ids)]))
    .orderBy(asc(tags.id))
    .for('share');
  return new Map(rows.map((r) => [r.id, r]));
}

/**
 * Resolve typed tags to ids, creating pending tags for new ones. Order and duplicates do not matter.
 * The tags found are locked FOR SHARE in the caller's transaction, so a merge (which locks them
 * FOR UPDATE) either finishes first — and the merged tag resolves to its target — or waits until
 * this save has committed and then moves its links too: no content keeps a merged tag.
 * `existing` are the tag ids the content carries already: a deprecated one among them is kept;
 * adding a deprecated tag is refused with a 400.
 */
export async function resolveTagIds(
  db: DbOrTx,
  user: AuthUser,
  typed: string[],
  existing: Iterable<number> = [],
): Promise<number[]> {
  const kept = new Set(existing);
  const found = new Map<string, number>();
  const toCreate: Array<{ slug: string; name: string }> = [];
  for (const raw of typed) {
    const name = raw.trim().replace(/\s+/g, ' ');
    const slug = slugify(name);
    if (!slug)
      throw fail.validation(`"${raw}" is not a usable tag.`, {
        issues: [{ path: 'tags', message: `"${raw}" has no letters or digits` }],
      });
    if (found.has(slug) || toCreate.some((c) => c.slug === slug)) continue;
    const [direct] = await db.select({ id: tags.id }).from(tags).where(eq(tags.slug, slug));
    const id =
      direct?.id ??
      (await db.select({ id: tagAliases.tagId }).from(tagAliases).where(eq(tagAliases.alias, slug)))[0]?.id;
    if (id === undefined) toCreate.push({ slug, name });
    else found.set(slug, id);
  }
  const ids = new Set<number>();
  let locked = await shareLock(db, [...found.values()]);
  for (const start of found.values()) {
    let tag = locked.get(start);
    // Follow merges to the surviving tag (locking it too).
    for (let hops = 0; tag?.mergedIntoId && hops < 5; hops++) {
      const nextId = tag.mergedIntoId;
      if (!locked.has(nextId)) locked = new Map([...locked, ...(await shareLock(db, [nextId]))]);
      tag = locked.get(nextId);
    }
    if (!tag) continue;
    if (tag.state === 'deprecated' && !kept.has(tag.id)) {
      throw fail.validation(`The tag "${tag.name}" is deprecated and takes no new use.`, {
        issues: [{ path: 'tags', message: `"${tag.name}" is deprecated` }],
      });
    }
    ids.add(tag.id);
  }
  for (const { slug, name } of toCreate) {
    const [created] = await db
      .insert(tags)
      .values({
        slug,
        name: name.slice(0, 60),
        state: user.role === 'member' ? 'pending' : 'approved',
        createdBy: user.id,
      })
      .onConflictDoNothing()
      .returning();
    const tag = created ?? (await db.select().from(tags).where(eq(tags.slug, slug)))[0];
    if (tag) ids.add(tag.id);
  }
  return [...ids];
}

/** Approved tags matching the query, plus the member's own pending ones (for the tag field). */
export async function suggestTags(ctx: AppContext, user: AuthUser | null, q: string): Promise<{ items: TagRef[] }> {
  const pattern = `%${q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
  const visible = user
    ? or(eq(tags.state, 'approved'), and(eq(tags.state, 'pending'), eq(tags.createdBy, user.id)))
    : eq(tags.state, 'approved');
  const rows = await ctx.db
    .select({ slug: tags.slug, name: tags.name, state: tags.state })
    .from(tags)
    .where(
      and(
        visible,
        sql`${tags.mergedIntoId} IS NULL`,
        q ? or(ilike(tags.name, pattern), ilike(tags.slug, pattern)) : undefined,
      ),
    )
    .orderBy(tags.name)
    .limit(20);
  return { items: rows.map(toTagRef) };
}

export async function tagRefsByIds(db: DbOrTx, ids: number[]): Promise<Map<number, TagRef>> {
  if (!ids.length) return new Map();
  const rows = await db
    .select({ id: tags.id, slug: tags.slug, name: tags.name, state: tags.state })
    .from(tags)
    .where(inArray(tags.id, ids));
  return new Map(rows.map((r) => [r.id, toTagRef(r)]));
}
