/**
 * Search across projects: the API call, the search state kept in the URL (`/search?q=…&kind=erratum
 * &severity=critical`, so a search can be shared), and the as-you-type helper that waits for a pause
 * and abandons requests the reader has typed past.
 */
import {
  searchQuerySchema,
  type Facet,
  type SearchKind,
  type SearchQueryInput,
  type SearchResult,
} from '@shared/contracts/search';
import type { ErratumStatus, Severity } from '@shared/domain';
import { computed } from 'vue';
import { useRoute, useRouter, type LocationQuery, type LocationQueryRaw } from 'vue-router';
import { http } from './http';
import { reportUnexpected } from './notifier';

/** The facet groups, in the order the search page shows them. */
export const facetGroups = ['kind', 'severity', 'status', 'category', 'tag', 'part', 'project'] as const;
export type FacetGroup = (typeof facetGroups)[number];

export interface SearchState {
  q: string;
  kind: SearchKind[];
  severity: Severity[];
  status: ErratumStatus[];
  category: string[];
  tag: string[];
  part: string[];
  project: string[];
  /** "Known mistakes only": errata and lessons. */
  mistakes: boolean;
  /**
   * The reader turned down the spelling correction ("search instead for …"). The API corrects a
   * query that matches nothing by itself, so this stays in the URL and the page shows what the
   * words as typed found: nothing. Not sent to the API.
   */
  exact: boolean;
  page: number;
}

export const SEARCH_PAGE_SIZE = 20;
/** The last page the API serves (`page` is at most 50). */
export const SEARCH_MAX_PAGE = 50;

/**
 * The API's query string. Filters are repeated parameters (`kind=erratum&kind=lesson`), which the
 * HTTP client's `query` option cannot express (it keeps one value per key), so the string is built here.
 */
export function searchQueryString(params: SearchQueryInput): string {
  const out = new URLSearchParams();
  for (const [key, value] of Object.entries(params)) {
    if (value === undefined || value === null || value === '') continue;
    for (const one of Array.isArray(value) ? value : [value]) out.append(key, String(one));
  }
  return out.toString();
}

export const searchApi = {
  search: (params: SearchQueryInput, options: { signal?: AbortSignal } = {}) => {
    const query = searchQueryString(params);
    return http.get<SearchResult>(
      query ? `/search?${query}` : '/search',
      options.signal ? { signal: options.signal } : {},
    );
  },
};

// --- The URL ---------------------------------------------------------------------------------------

export function emptySearchState(): SearchState {
  return {
    q: '',
    kind: [],
    severity: [],
    status: [],
    category: [],
    tag: [],
    part: [],
    project: [],
    mistakes: false,
    exact: false,
    page: 1,
  };
}

function strings(raw: LocationQuery[string] | undefined): string[] {
  const list = Array.isArray(raw) ? raw : raw === undefined || raw === null ? [] : [raw];
  return list.filter((v): v is string => typeof v === 'string');
}

/**
 * Values of one filter that the API accepts, each checked against the contract's own rule, so an
 * edited or outdated link opens with whatever still makes sense instead of failing as a whole.
 */
function accepted<G extends FacetGroup>(group: G, raw: LocationQuery[string] | undefined): SearchState[G] {
  const rule = searchQuerySchema.shape[group];
  const kept = strings(raw)
    .map((v) => v.trim())
    .filter((v) => v !== '' && rule.safeParse(v).success);
  return [...new Set(kept)] as SearchState[G];
}

/** The search state in a route query; anything the API would refuse is dropped. */
export function stateFromQuery(query: LocationQuery): SearchState {
  const q = strings(query.q)[0] ?? '';
  const page = searchQuerySchema.shape.page.safeParse(strings(query.page)[0] ?? '1');
  const mistakes = searchQuerySchema.shape.mistakes.safeParse(strings(query.mistakes)[0]);
  const state = emptySearchState();
  for (const group of facetGroups) Object.assign(state, { [group]: accepted(group, query[group]) });
  return {
    ...state,
    q: q.slice(0, 200),
    mistakes: mistakes.success ? mistakes.data : false,
    exact: strings(query.exact)[0] === '1',
    page: page.success ? page.data : 1,
  };
}

/** The state as a route query; defaults are left out, so a plain search keeps a plain address. */
export function stateToQuery(state: SearchState): LocationQueryRaw {
  const query: LocationQueryRaw = {};
  if (state.q.trim() !== '') query.q = state.q.trim();
  for (const group of facetGroups) {
    const values = state[group];
    if (values.length === 1) query[group] = values[0];
    else if (values.length > 1) query[group] = [...values];
  }
  if (state.mistakes) query.mistakes = '1';
  if (state.exact) query.exact = '1';
  if (state.page > 1) query.page = String(state.page);
  return query;
}

/** What the API is asked for this state. */
export function apiParamsOf(state: SearchState, pageSize = SEARCH_PAGE_SIZE): SearchQueryInput {
  const params: SearchQueryInput = { q: state.q.trim() };
  for (const group of facetGroups) if (state[group].length) Object.assign(params, { [group]: [...state[group]] });
  if (state.mistakes) params.mistakes = '1';
  if (state.page > 1) params.page = state.page;
  params.pageSize = pageSize;
  return params;
}

export function activeFilterCount(state: SearchState): number {
  return facetGroups.reduce((n, group) => n + state[group].length, 0) + (state.mistakes ? 1 : 0);
}

/** Whether there is anything to search for: words or at least one filter. */
export function hasSearch(state: SearchState): boolean {
  return state.q.trim() !== '' || activeFilterCount(state) > 0;
}

/**
 * The search page's state, read from and written to the URL. Every change is a history entry
 * (back undoes a chip), and changing the words or a filter goes back to page 1.
 */
export function useSearchQuery() {
  const route = useRoute();
  const router = useRouter();
  const state = computed(() => stateFromQuery(route.query));
  const params = computed(() => apiParamsOf(state.value));

  // A second change made before the first navigation lands builds on the first.
  let pending: SearchState | null = null;

  function write(next: SearchState) {
    pending = next;
    router
      .push({ name: 'search', query: stateToQuery(next) })
      .catch(reportUnexpected)
      .finally(() => {
        if (pending === next) pending = null;
      });
  }
  const current = () => pending ?? state.value;

  return {
    state,
    params,
    /** Change the words, the toggle or whole filter lists; back to page 1. New words are corrected again. */
    update(patch: Partial<Omit<SearchState, 'page'>>) {
      const now = current();
      const exact = patch.exact ?? (patch.q !== undefined && patch.q.trim() !== now.q.trim() ? false : now.exact);
      write({ ...now, ...patch, exact, page: 1 });
    },
    /** Add a value to a filter group, or take it away if it is there. */
    toggle(group: FacetGroup, value: string) {
      const now = current();
      const values = now[group] as string[];
      const nextValues = values.includes(value) ? values.filter((v) => v !== value) : [...values, value];
      write({ ...now, [group]: nextValues, page: 1 });
    },
    /** Drops every filter and the toggle; the words stay. */
    clearFilters() {
      write({ ...emptySearchState(), q: current().q, exact: current().exact });
    },
    setPage(page: number) {
      write({ ...current(), page: Math.min(Math.max(1, Math.floor(page)), SEARCH_MAX_PAGE) });
    },
  };
}

// --- Facets that allow more than one choice per group ------------------------------------------------

export type FacetSet = SearchResult['facets'];

/**
 * One search plus its facet counts. The API counts facets under every filter, so once "Critical" is
 * chosen the severity group would only offer "Critical". For each group with a choice, its counts
 * come from the same search without that group's own filter, which is what choosing a second value
 * in the group (an OR within the group) would add to.
 */
export async function searchWithFacets(
  state: SearchState,
  signal: AbortSignal,
  api: Pick<typeof searchApi, 'search'> = searchApi,
): Promise<SearchResult> {
  const chosen = facetGroups.filter((g) => state[g].length > 0);
  const [main, ...others] = await Promise.all([
    api.search(apiParamsOf(state), { signal }),
    ...chosen.map((group) =>
      api.search({ ...apiParamsOf({ ...state, [group]: [], page: 1 }), pageSize: 1 }, { signal }),
    ),
  ]);
  const facets: FacetSet = { ...main!.facets };
  chosen.forEach((group, i) => {
    facets[group] = others[i]!.facets[group];
  });
  return {
    ...main!,
    facets,
    facetsApproximate: main!.facetsApproximate || others.some((o) => o.facetsApproximate),
  };
}

/** A group's chips: the API's counts, plus chosen values it did not count (shown with 0). */
export function facetOptions(facets: Facet, chosen: readonly string[]): Facet {
  const missing = chosen
    .filter((v) => !facets.some((f) => f.value === v))
    .map((value) => ({ value, label: value, count: 0 }));
  return [...facets, ...missing];
}

// --- As you type -------------------------------------------------------------------------------------

export const TYPING_PAUSE_MS = 200;

export interface LatestRequest<A> {
  /** Run after a pause of `delay` ms; a request still waiting or under way is abandoned at once. */
  schedule(args: A): void;
  /** Run now, abandoning any earlier one. */
  run(args: A): void;
  /** Abandon whatever is waiting or under way. */
  cancel(): void;
}

function isAbort(error: unknown): boolean {
  return (error as Error | null)?.name === 'AbortError';
}

/**
 * Debounce with cancellation: only the newest request may report. A superseded request is aborted
 * through its signal, and even if it still answers (or fails), its answer is ignored. Aborts are
 * expected, so they reach neither `onError` nor the console.
 */
export function latestRequest<A, R>(
  request: (args: A, signal: AbortSignal) => Promise<R>,
  handlers: {
    onResult: (result: R, args: A) => void;
    onError?: (error: unknown, args: A) => void;
    /** The newest request finished (answered or failed), or was cancelled. */
    onSettled?: () => void;
  },
  delay = TYPING_PAUSE_MS,
): LatestRequest<A> {
  let timer: ReturnType<typeof setTimeout> | undefined;
  let current: AbortController | null = null;

  function abandon() {
    clearTimeout(timer);
    timer = undefined;
    current?.abort();
    current = null;
  }

  function start(args: A) {
    const controller = new AbortController();
    current = controller;
    const mine = () => current === controller && !controller.signal.aborted;
    let promise: Promise<R>;
    try {
      promise = request(args, controller.signal);
    } catch (error) {
      promise = Promise.reject(error);
    }
    promise.then(
      (result) => {
        if (!mine()) return;
        current = null;
        handlers.onResult(result, args);
        handlers.onSettled?.();
      },
      (error: unknown) => {
        if (!mine()) return;
        current = null;
        if (!isAbort(error)) (handlers.onError ?? reportUnexpected)(error, args);
        handlers.onSettled?.();
      },
    );
  }

  return {
    schedule(args) {
      abandon();
      timer = setTimeout(() => {
        timer = undefined;
        start(args);
      }, delay);
    },
    run(args) {
      abandon();
      start(args);
    },
    cancel() {
      const busy = timer !== undefined || current !== null;
      abandon();
      if (busy) handlers.onSettled?.();
    },
  };
}
