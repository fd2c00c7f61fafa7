/**
 * What readers see of the vocabulary: the tag index and one page per tag. A merged tag, an alias
 * or a slug a rename left behind answers with where the tag is now, so old links keep working.
 */
import {
  TAG_PAGE_ITEMS_PER_KIND,
  type TagIndex,
  type TagIndexQuery,
  type TagPageResponse,
  type TagSummary,
} from '../../shared/contracts/tags';
import { tagStates, type TagState } from '../../shared/domain';
import type { DbOrTx } from '../../db/client';
import type { AppContext } from '../context';
import { fail } from '../http/errors';
import type { AuthUser } from '../http/routes';
import * as q from './queries';

export function viewerOfUser(user: AuthUser | null): q.TagViewer {
  return { userId: user?.id ?? null, admin: user?.role === 'admin' };
}

export function canCurate(user: AuthUser | null): boolean {
  return user?.role === 'moderator' || user?.role === 'admin';
}

/** Pending tags are seen by moderators and by the member who made them; the rest by everyone. */
function maySee(user: AuthUser | null, tag: q.TagRow): boolean {
  return tag.state !== 'pending' || canCurate(user) || (user !== null && tag.createdBy === user.id);
}

export async function summarize(db: DbOrTx, viewer: q.TagViewer, rows: q.TagRow[]): Promise<Map<number, TagSummary>> {
  const ids = rows.map((r) => r.id);
  const [counts, aliases] = await Promise.all([q.countsByTag(db, viewer, ids), q.aliasesOf(db, ids)]);
  return new Map(
    rows.map((r) => {
      const c = counts.get(r.id) ?? { lessons: 0, errata: 0, projects: 0 };
      return [
        r.id,
        {
          slug: r.slug,
          name: r.name,
          description: r.description,
          state: r.state,
          aliases: aliases.get(r.id) ?? [],
          counts: {
            lessons: c.lessons,
            errata: c.errata,
            projects: c.projects,
            total: c.lessons + c.errata + c.projects,
          },
          createdAt: r.createdAt.toISOString(),
          updatedAt: r.updatedAt.toISOString(),
        },
      ];
    }),
  );
}

export async function tagIndex(
  ctx: AppContext,
  user: AuthUser | null,
  query: Required<Pick<TagIndexQuery, 'q' | 'sort'>> & { state?: TagState },
): Promise<TagIndex> {
  const curator = canCurate(user);
  const states: TagState[] = query.state ? [query.state] : [...tagStates];
  const rows = await q.listLiveTags(ctx.db, {
    q: query.q,
    states,
    pendingOf: user?.id ?? null,
    allPending: curator,
  });
  const summaries = await summarize(ctx.db, viewerOfUser(user), rows);
  const items = rows.map((r) => summaries.get(r.id)!);
  const byName = (a: TagSummary, b: TagSummary) => a.name.localeCompare(b.name, 'en', { sensitivity: 'base' });
  if (query.sort === 'name') items.sort(byName);
  if (query.sort === 'count') items.sort((a, b) => b.counts.total - a.counts.total || byName(a, b));
  if (query.sort === 'newest') items.sort((a, b) => b.createdAt.localeCompare(a.createdAt) || byName(a, b));
  return { items, viewer: { canCurate: curator } };
}

function plainExcerpt(markdown: string, max = 200): string {
  const text = markdown
    .replace(/!\[[^\]]*\]\([^)]*\)/g, '')
    .replace(/\[([^\]]*)\]\([^)]*\)/g, '$1')
    .replace(/[`*_#>~]/g, '')
    .replace(/\s+/g, ' ')
    .trim();
  return text.length > max ? `${text.slice(0, max - 1).trimEnd()}…` : text;
}

/** Finds a tag by its slug or an alias: the tag itself, or where the slug leads now. */
export async function lookUp(
  db: DbOrTx,
  slug: string,
): Promise<{ tag: q.TagRow; redirect: null } | { tag: q.TagRow; redirect: 'merged' | 'alias' } | null> {
  const direct = await q.findTagBySlug(db, slug);
  if (direct && !direct.mergedIntoId) return { tag: direct, redirect: null };
  if (direct) return { tag: await q.followMerges(db, direct), redirect: 'merged' };
  const aliased = await q.findAliasTarget(db, slug);
  if (!aliased) return null;
  return { tag: await q.followMerges(db, aliased), redirect: 'alias' };
}

export async function tagPage(ctx: AppContext, user: AuthUser | null, slug: string): Promise<TagPageResponse> {
  const found = await lookUp(ctx.db, slug);
  if (!found || !maySee(user, found.tag)) throw fail.notFound('The tag');
  if (found.redirect) return { kind: 'redirect', redirectTo: found.tag.slug, reason: found.redirect };
  const { tag } = found;
  const viewer = viewerOfUser(user);
  const [summaries, items, mergedFrom] = await Promise.all([
    summarize(ctx.db, viewer, [tag]),
    q.itemsOfTag(ctx.db, viewer, tag.id, TAG_PAGE_ITEMS_PER_KIND),
    q.mergedInto(ctx.db, tag.id),
  ]);
  const iso = (d: Date | string) => new Date(d).toISOString();
  return {
    kind: 'tag',
    tag: summaries.get(tag.id)!,
    mergedFrom,
    lessons: items.lessons.map((l) => ({
      id: Number(l.id),
      excerpt: plainExcerpt(l.body),
      project: { slug: l.project_slug, title: l.project_title },
      viaSlug: l.via_slug,
      updatedAt: iso(l.updated_at),
      url: `/projects/${l.project_slug}#lessons`,
    })),
    errata: items.errata.map((e) => ({
      number: Number(e.number),
      code: `E${e.number}`,
      title: e.title,
      severity: e.severity as TagPageErratum['severity'],
      status: e.status as TagPageErratum['status'],
      project: { slug: e.project_slug, title: e.project_title },
      viaSlug: e.via_slug,
      updatedAt: iso(e.updated_at),
      url: `/projects/${e.project_slug}/errata/E${e.number}`,
    })),
    projects: items.projects.map((p) => ({
      slug: p.slug,
      title: p.title,
      summary: p.summary,
      status: p.status as 'draft' | 'published',
      viaSlug: p.via_slug,
      updatedAt: iso(p.updated_at),
      url: `/projects/${p.slug}`,
    })),
    feedUrl: `/api/feeds/tags/${tag.slug}.atom`,
    viewer: { canCurate: canCurate(user) },
  };
}

type TagPageErratum = Extract<TagPageResponse, { kind: 'tag' }>['errata'][number];
