/**
 * Typed access to the tag index, tag pages and tag curation (moderators). Components call these,
 * never fetch. Suggestions while typing a tag stay in composables/tags.ts.
 */
import type {
  TagCurationResult,
  TagEditInput,
  TagHistory,
  TagIndex,
  TagIndexQuery,
  TagMergeInput,
  TagPageResponse,
  TagRejectInput,
} from '@shared/contracts/tags';
import { http } from './http';

const base = (slug: string) => `/tags/${encodeURIComponent(slug)}`;

export type TagCurationVerb = 'approve' | 'unmerge' | 'deprecate' | 'undeprecate';

export const tagPagesApi = {
  index: (query: TagIndexQuery = {}, signal?: AbortSignal) =>
    http.get<TagIndex>('/tags', { query: { ...query }, ...(signal ? { signal } : {}) }),
  page: (slug: string) => http.get<TagPageResponse>(base(slug)),
  history: (slug: string) => http.get<TagHistory>(`${base(slug)}/history`),
  /** approve, unmerge, deprecate, undeprecate: a reason only (required for unmerge and deprecate). */
  act: (slug: string, verb: TagCurationVerb, reason: string) =>
    http.post<TagCurationResult>(`${base(slug)}/${verb}`, { reason }),
  reject: (slug: string, input: TagRejectInput) => http.post<TagCurationResult>(`${base(slug)}/reject`, input),
  edit: (slug: string, input: TagEditInput) => http.patch<TagCurationResult>(base(slug), input),
  merge: (slug: string, input: TagMergeInput) => http.post<TagCurationResult>(`${base(slug)}/merge`, input),
};

/** "3 lessons · 1 erratum · 2 projects", leaving out kinds with none; "not used yet" for none at all. */
export function describeCounts(counts: { lessons: number; errata: number; projects: number }): string {
  const parts: string[] = [];
  if (counts.lessons) parts.push(`${counts.lessons} ${counts.lessons === 1 ? 'lesson' : 'lessons'}`);
  if (counts.errata) parts.push(`${counts.errata} ${counts.errata === 1 ? 'erratum' : 'errata'}`);
  if (counts.projects) parts.push(`${counts.projects} ${counts.projects === 1 ? 'project' : 'projects'}`);
  return parts.length ? parts.join(' · ') : 'not used yet';
}
