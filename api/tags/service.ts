/**
 * Tags as members type them. A known name, slug or alias resolves to its tag (a merged tag to
 * the tag it was merged into); an unknown one is created as a pending tag by that member, so it
 * shows on their content at once and waits for a moderator. Deprecated tags take no new use.
 */
import { and, eq, ilike, inArray, or, sql } from 'drizzle-orm';
import type { DbOrTx } from '../../db/client';
import { tagAliases, tags } from '../../db/schema';
import type { TagRef } from '../../shared/contracts/errata';
import { slugify } from '../../shared/text';
import type { AppContext } from '../context';
import { fail } from '../http/errors';
import type { AuthUser } from '../http/routes';

export function toTagRef(row: { slug: string; name: string; state: TagRef['state'] }): TagRef {
  return { slug: row.slug, name: row.name, state: row.state };
}

/** Resolve typed tags to ids, creating pending tags for new ones. Order and duplicates do not matter. */
export async function resolveTagIds(db: DbOrTx, user: AuthUser, typed: string[]): Promise<number[]> {
  const ids = new Set<number>();
  for (const raw of typed) {
    const name = raw.trim().replace(/\s+/g, ' ');
    const slug = slugify(name);
    if (!slug)
      throw fail.validation(`"${raw}" is not a usable tag.`, {
        issues: [{ path: 'tags', message: `"${raw}" has no letters or digits` }],
      });
    const [direct] = await db.select().from(tags).where(eq(tags.slug, slug));
    let tag = direct;
    if (!tag) {
      const [alias] = await db
        .select({ tag: tags })
        .from(tagAliases)
        .innerJoin(tags, eq(tags.id, tagAliases.tagId))
        .where(eq(tagAliases.alias, slug));
      tag = alias?.tag;
    }
    // Follow merges to the surviving tag.
    for (let hops = 0; tag?.mergedIntoId && hops < 5; hops++) {
      const [next] = await db.select().from(tags).where(eq(tags.id, tag.mergedIntoId));
      tag = next;
    }
    if (tag?.state === 'deprecated') {
      throw fail.validation(`The tag "${tag.name}" is deprecated and takes no new use.`, {
        issues: [{ path: 'tags', message: `"${tag.name}" is deprecated` }],
      });
    }
    if (!tag) {
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
      tag = created ?? (await db.select().from(tags).where(eq(tags.slug, slug)))[0];
    }
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
