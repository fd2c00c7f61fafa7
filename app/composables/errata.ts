/**
 * Typed access to a project's errata, and the errata table's filters kept in the URL. Pages and
 * components call these, never fetch.
 */
import type {
  categoryListSchema,
  Comment,
  CommentList,
  CreateErratum,
  ErratumDetail,
  ErratumList,
  ErratumSaveResult,
  SaveErratum,
} from '@shared/contracts/errata';
import { computed, toValue, type MaybeRefOrGetter, type Ref } from 'vue';
import { useRoute, useRouter, type LocationQuery } from 'vue-router';
import type { z } from 'zod';
import { filtersFromQuery, filtersToQuery, QUERY_KEYS, type ErrataFilters } from '@/components/errata/filter';
import { http } from './http';
import { reportUnexpected } from './notifier';
import { useRevisionHistory, type RevisionHistory } from './revisions';

export type CategoryList = z.infer<typeof categoryListSchema>;

const enc = encodeURIComponent;
const base = (slug: string) => `/projects/${enc(slug)}/errata`;
const one = (slug: string, number: number) => `${base(slug)}/${number}`;

/** The number in an erratum code from a route: `E3` or `3` → 3; anything else → null. */
export function erratumNumberOf(code: string | number): number | null {
  const match = /^[Ee]?(\d{1,6})$/.exec(String(code).trim());
  if (!match) return null;
  const n = Number(match[1]);
  return n >= 1 ? n : null;
}

export const errataApi = {
  list: (slug: string) => http.get<ErratumList>(base(slug)),
  get: (slug: string, number: number) => http.get<ErratumDetail>(one(slug, number)),
  create: (slug: string, input: CreateErratum) => http.post<ErratumDetail>(base(slug), input),
  save: (slug: string, number: number, input: SaveErratum) => http.put<ErratumSaveResult>(one(slug, number), input),
  categories: () => http.get<CategoryList>('/categories'),
  /** The discussion of an erratum, as DiscussionThread takes it. */
  comments: (slug: string, number: number) => ({
    load: () => http.get<CommentList>(`${one(slug, number)}/comments`),
    post: (body: string) => http.post<Comment>(`${one(slug, number)}/comments`, { body }),
  }),
  /**
   * Where the Markdown export downloads from (a plain link: the browser saves the file the server
   * names). With `board`, only the errata affecting that board revision.
   */
  markdownUrl: (slug: string, board?: number | null) =>
    `/api/projects/${enc(slug)}/errata.md${board ? `?board=${encodeURIComponent(String(board))}` : ''}`,
};

/**
 * History of one erratum: the list, single revisions (cached: they never change), and restoring
 * an earlier one, which the server records as a new revision.
 */
export function useErratumHistory(
  slug: MaybeRefOrGetter<string>,
  number: MaybeRefOrGetter<number>,
): RevisionHistory<ErratumDetail, ErratumSaveResult> & { erratum: Ref<ErratumDetail | null> } {
  const path = () => one(toValue(slug), toValue(number));
  const history = useRevisionHistory<ErratumDetail, ErratumSaveResult>({
    subjectPath: path,
    historyPath: () => `${path()}/revisions`,
    restorePath: () => `${path()}/restore`,
    restoreBody: (revision, baseRevision, message) => ({ number: revision, baseRevision, message }),
    subjectOf: (result) => result.erratum,
  });
  return { ...history, erratum: history.subject };
}

/**
 * The errata table's filters, read from and written to the current route's query, so a view
 * ("Rev A, open, critical") can be shared as a link. Changes replace the history entry: the back
 * button leaves the table instead of undoing each chip. Query keys other than the filters'
 * survive a change.
 */
export function useErrataFilters() {
  const route = useRoute();
  const router = useRouter();
  const filters = computed<ErrataFilters>(() => filtersFromQuery(route.query));

  // A second change made before the first navigation lands must build on the first.
  let pending: LocationQuery | null = null;

  function write(next: ErrataFilters) {
    const current = pending ?? route.query;
    const query: LocationQuery = {};
    for (const [key, value] of Object.entries(current)) {
      if (!(QUERY_KEYS as readonly string[]).includes(key)) query[key] = value;
    }
    Object.assign(query, filtersToQuery(next));
    pending = query;
    router
      .replace({ query })
      .catch(reportUnexpected)
      .finally(() => {
        if (pending === query) pending = null;
      });
  }

  function update(patch: Partial<ErrataFilters>) {
    const current = pending ? filtersFromQuery(pending) : filters.value;
    write({ ...current, ...patch });
  }

  /** Drops every filter; the sort stays. */
  function clear() {
    const current = pending ? filtersFromQuery(pending) : filters.value;
    write({ ...filtersFromQuery({}), sort: current.sort });
  }

  return { filters, update, clear };
}
