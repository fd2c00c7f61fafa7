/**
 * Searching as a viewer: what they may see decides the filter (published content for all; a
 * project's drafts for its members; everything for admins), never the client.
 */
import { eq } from 'drizzle-orm';
import type { SearchQuery, SearchResult } from '../../shared/contracts/search';
import { projectMembers } from '../../db/schema';
import type { AppContext } from '../context';
import type { AuthUser } from '../http/routes';
import { ANONYMOUS, type SearchBackend, type SearchViewer } from './backend';
import { PostgresSearch } from './postgres';

const backends = new WeakMap<AppContext, SearchBackend>();

/** The backend that answers searches for this app: Meilisearch when configured, else PostgreSQL. */
export function searchBackendOf(ctx: AppContext): SearchBackend {
  let backend = backends.get(ctx);
  if (!backend) {
    backend = ctx.searchBackend ?? new PostgresSearch(ctx.db);
    backends.set(ctx, backend);
  }
  return backend;
}

export async function viewerOf(ctx: AppContext, user: AuthUser | null): Promise<SearchViewer> {
  if (!user) return ANONYMOUS;
  if (user.role === 'admin') return { admin: true, memberProjectIds: [] };
  const rows = await ctx.db.select({ id: projectMembers.projectId }).from(projectMembers).where(eq(projectMembers.userId, user.id));
  return { admin: false, memberProjectIds: rows.map((r) => r.id) };
}

export async function search(ctx: AppContext, user: AuthUser | null, query: SearchQuery): Promise<SearchResult> {
  return searchBackendOf(ctx).search(query, await viewerOf(ctx, user));
}
