/**
 * Meilisearch as the search backend (when MEILISEARCH_URL is set), through the `meilisearch`
 * SDK. One index holds every search document; PostgreSQL's index is kept as well (the indexer
 * reads its own state from it) and feeds this one after each batch.
 *
 * Matching what PostgreSQL does (api/search/postgres.ts):
 * - documents carry the normalized text of shared/search/normalize.ts and the code lexemes,
 *   and queries are normalized the same way, so `328p` finds ATmega328P and `3.3V` is `3V3`;
 * - searchable attributes in weight order: the title alone, the title with part numbers and pin
 *   labels (A) and the codes, then tags and errata fields (B), then rework text (C), then long
 *   prose (D) — the title comes first on its own because Meilisearch has no term frequency to
 *   tell an item about GP14 from one that merely lists GP14 among its pins; the
 *   `attribute` ranking rule comes before `proximity` so the weights count first, as they do
 *   in PostgreSQL's weighted rank;
 * - every word must match (`matchingStrategy: 'all'`); phrases and `-exclusions` are
 *   Meilisearch's own operators; `OR` is not, so a query with OR runs one search per
 *   alternative and merges them (`searchAlternatives`): ids and facet fields of up to
 *   OR_CANDIDATES matches each, merged by rank and de-duplicated, facets and the total counted
 *   over the union (approximate when an alternative had more), then the page's hits fetched
 *   again with highlights. When few items have every word, the page is widened with items that
 *   have some of them, as in PostgreSQL (not with `exact`, which also turns every word into a
 *   one-word phrase: Meilisearch matches phrases without typos or prefixes);
 * - typo tolerance is Meilisearch's own (`atmaga328` finds ATmega328P by itself), so there is
 *   no "did you mean": `correctedQuery` is null and `suggestions` empty;
 * - visibility is a filter: `visible = true OR project_id IN [member projects]`, none for admins.
 *
 * Every write waits for its task and throws when it failed, so the indexer re-queues a batch
 * Meilisearch did not take (a failed task is returned by the SDK, not thrown).
 */
import {
  Meilisearch,
  type EnqueuedTaskPromise,
  type Hit,
  type Index,
  type SearchParams,
  type SearchResponse,
  type Settings,
} from 'meilisearch';
import type { Config } from '../config';
import type { Facet, SearchHit, SearchKind, SearchQuery, SearchResult } from '../../shared/contracts/search';
import { searchKindLabels } from '../../shared/contracts/search';
import { erratumStatusLabels, severityLabels, type ErratumStatus, type Severity } from '../../shared/domain';
import { normalizeForSearch } from '../../shared/search/normalize';
import type { SearchBackend, SearchViewer } from './backend';
import type { SearchDocument } from './documents';
import { MARK_CLOSE, MARK_OPEN, escapeHtml, markedHtml } from './postgres';

export const DEFAULT_INDEX = 'reworkbook';
/** Matches fetched per alternative of an OR query (ids and facet fields only). */
export const OR_CANDIDATES = 1000;
/** OR alternatives searched (each costs two requests); further ones are dropped. */
const MAX_ALTERNATIVES = 8;
const UPSERT_BATCH = 1000;
/** Bodies are indexed whole in `prose_terms`; the stored copy only feeds snippets. */
const SNIPPET_SOURCE_CHARS = 20_000;
const SNIPPET_WORDS = 30;
const FACET_VALUES = 30;

/** What one search document looks like in Meilisearch. */
export interface MeiliDocument {
  /** `${kind}-${refId}`: Meilisearch ids allow letters, digits, `-` and `_`. */
  id: string;
  kind: SearchKind;
  ref_id: number;
  project_id: number | null;
  visible: boolean;
  title: string;
  /** Plain text the snippet is cut from (not searched: its words are in the *_terms fields). */
  body: string;
  url: string;
  project_slug: string | null;
  project_title: string | null;
  /** `slug title`, so the project facet can be labelled (slugs have no spaces). */
  project_facet: string | null;
  category: string | null;
  severity: Severity | null;
  status: ErratumStatus | null;
  tags: string[];
  parts: string[];
  pins: string[];
  /** Milliseconds since the epoch (sortable). */
  updated_at: number;
  /** The title alone, normalized: a word in it outranks the same word among parts and pins. */
  title_words: string;
  title_terms: string;
  codes: string[];
  detail_terms: string;
  rework_terms: string;
  rework_codes: string[];
  prose_terms: string;
}

const SEARCHABLE: Array<keyof MeiliDocument> = [
  'title_words',
  'title_terms',
  'codes',
  'detail_terms',
  'rework_terms',
  'rework_codes',
  'prose_terms',
];
const FACETS = ['kind', 'category', 'severity', 'status', 'tags', 'parts', 'project_facet'] as const;
const FILTERABLE: Array<keyof MeiliDocument> = [
  'id',
  'kind',
  'category',
  'severity',
  'status',
  'tags',
  'parts',
  'project_slug',
  'project_id',
  'project_facet',
  'visible',
];
const RETRIEVE: Array<keyof MeiliDocument> = [
  'id',
  'kind',
  'ref_id',
  'title',
  'body',
  'url',
  'project_slug',
  'project_title',
  'project_facet',
  'category',
  'severity',
  'status',
  'tags',
  'parts',
  'pins',
  'updated_at',
];
const FACET_FIELDS: Array<keyof MeiliDocument> = [
  'id',
  'kind',
  'category',
  'severity',
  'status',
  'tags',
  'parts',
  'project_facet',
];

/** The deepest hit a reader can page to: page ≤ 50 × pageSize ≤ 50 (shared/contracts/search.ts). */
const DEEPEST_HIT = 50 * 50;

export const INDEX_SETTINGS: Settings = {
  searchableAttributes: SEARCHABLE,
  filterableAttributes: FILTERABLE,
  sortableAttributes: ['updated_at'],
  rankingRules: ['words', 'typo', 'attribute', 'proximity', 'sort', 'exactness'],
  faceting: { maxValuesPerFacet: 100, sortFacetValuesBy: { '*': 'count' } },
  // Meilisearch stops counting and paging at maxTotalHits (1000 by default).
  pagination: { maxTotalHits: Math.max(DEEPEST_HIT, OR_CANDIDATES) },
};

export function toMeiliDocument(doc: SearchDocument): MeiliDocument {
  return {
    id: `${doc.kind}-${doc.refId}`,
    kind: doc.kind,
    ref_id: doc.refId,
    project_id: doc.projectId,
    visible: doc.visible,
    title: doc.title,
    body: doc.body.slice(0, SNIPPET_SOURCE_CHARS),
    url: doc.url,
    project_slug: doc.projectSlug,
    project_title: doc.projectTitle,
    project_facet: doc.projectSlug ? `${doc.projectSlug} ${doc.projectTitle ?? doc.projectSlug}` : null,
    category: doc.category,
    severity: doc.severity as Severity | null,
    status: doc.status as ErratumStatus | null,
    tags: doc.tags,
    parts: doc.parts,
    pins: doc.pins,
    updated_at: doc.updatedAt.getTime(),
    title_words: normalizeForSearch(doc.title),
    title_terms: normalizeForSearch(doc.weighted.a),
    codes: doc.codes.a,
    detail_terms: normalizeForSearch(doc.weighted.b),
    rework_terms: normalizeForSearch(doc.weighted.c),
    rework_codes: doc.codes.c,
    prose_terms: normalizeForSearch(doc.weighted.d),
  };
}

/** A filter value, quoted for Meilisearch's filter syntax. */
export const quoteFilterValue = (value: string) => `"${value.replace(/\\/g, '\\\\').replace(/"/g, '\\"')}"`;

const inList = (attribute: string, values: readonly string[]) =>
  `${attribute} IN [${values.map(quoteFilterValue).join(', ')}]`;

/**
 * The filter for a query and a viewer, or `null` when nothing can match (the known-mistakes
 * shortcut with kinds that are neither errata nor lessons). `''` means no filter.
 */
export function filterFor(query: SearchQuery, viewer: SearchViewer): string | null {
  const clauses: string[] = [];
  if (!viewer.admin) {
    const ids = viewer.memberProjectIds.map(Number).filter(Number.isInteger);
    clauses.push(ids.length ? `(visible = true OR project_id IN [${ids.join(', ')}])` : 'visible = true');
  }
  let kinds: readonly string[] = query.kind;
  if (query.mistakes) {
    kinds = query.kind.length ? query.kind.filter((k) => k === 'erratum' || k === 'lesson') : ['erratum', 'lesson'];
    if (!kinds.length) return null;
  }
  if (kinds.length) clauses.push(inList('kind', kinds));
  if (query.category.length) clauses.push(inList('category', query.category));
  if (query.severity.length) clauses.push(inList('severity', query.severity));
  if (query.status.length) clauses.push(inList('status', query.status));
  if (query.project.length) clauses.push(inList('project_slug', query.project));
  if (query.tag.length) clauses.push(inList('tags', query.tag));
  if (query.part.length) clauses.push(inList('parts', query.part));
  return clauses.join(' AND ');
}

/**
 * The OR alternatives of a websearch-style query: `a b OR "c d" -e` → [`a b`, `"c d" -e`]
 * (AND binds tighter than OR, as in PostgreSQL). Quoted text is never split.
 */
export function alternativesOf(text: string): string[] {
  const groups: string[][] = [[]];
  for (const token of text.match(/-?"[^"]*"?|\S+/g) ?? []) {
    if (/^or$/i.test(token)) groups.push([]);
    else groups.at(-1)!.push(token);
  }
  return groups.filter((g) => g.length).map((g) => g.join(' '));
}

const plainWords = (text: string) => !/["]|(^|\s)-|\sOR\s/i.test(text);

/**
 * `exact` (words as typed: no typo tolerance, no prefix, no widening) — read defensively, as
 * the query contract may not carry it yet. Meilisearch has no per-search switch for typos, but
 * a phrase is matched exactly, so every plain word becomes a one-word phrase.
 */
const wantsExact = (query: SearchQuery) => (query as SearchQuery & { exact?: boolean }).exact === true;

export function asPhrases(text: string): string {
  return (text.match(/-?"[^"]*"?|\S+/g) ?? [])
    .map((token) =>
      /^or$/i.test(token) || /^-?"/.test(token) || token.startsWith('-') ? token : `"${token.replace(/"/g, '')}"`,
    )
    .join(' ');
}

const facetLabel: Partial<Record<(typeof FACETS)[number], (value: string) => string>> = {
  kind: (v) => searchKindLabels[v as SearchKind] ?? v,
  severity: (v) => severityLabels[v as Severity]?.split(' —')[0] ?? v,
  status: (v) => erratumStatusLabels[v as ErratumStatus] ?? v,
};

function facetOf(counts: Record<string, number> | undefined, label: (value: string) => string = (v) => v): Facet {
  return Object.entries(counts ?? {})
    .sort((a, b) => b[1] - a[1] || a[0].localeCompare(b[0]))
    .slice(0, FACET_VALUES)
    .map(([value, count]) => ({ value, label: label(value), count }));
}

/** Project facet values are `slug title`: counted per slug, labelled with the title. */
function projectFacet(counts: Record<string, number> | undefined): Facet {
  const bySlug = new Map<string, { count: number; title: string; titleCount: number }>();
  for (const [value, count] of Object.entries(counts ?? {})) {
    const space = value.indexOf(' ');
    const slug = space < 0 ? value : value.slice(0, space);
    const title = space < 0 ? value : value.slice(space + 1);
    const entry = bySlug.get(slug) ?? { count: 0, title, titleCount: 0 };
    entry.count += count;
    // A title changed mid-reindex: label with the one most items carry.
    if (count > entry.titleCount) Object.assign(entry, { title, titleCount: count });
    bySlug.set(slug, entry);
  }
  const labels = new Map([...bySlug].map(([slug, e]) => [slug, e.title]));
  return facetOf(
    Object.fromEntries([...bySlug].map(([slug, e]) => [slug, e.count])),
    (slug) => labels.get(slug) ?? slug,
  );
}

type Distribution = Partial<Record<(typeof FACETS)[number], Record<string, number>>>;

function facetsOf(distribution: Distribution): SearchResult['facets'] {
  return {
    kind: facetOf(distribution.kind, facetLabel.kind),
    category: facetOf(distribution.category),
    severity: facetOf(distribution.severity, facetLabel.severity),
    status: facetOf(distribution.status, facetLabel.status),
    tag: facetOf(distribution.tags),
    part: facetOf(distribution.parts),
    project: projectFacet(distribution.project_facet),
  };
}

/** Facet counts over documents we hold (the union of an OR query's alternatives). */
function distributionOf(docs: Array<Partial<MeiliDocument>>): Distribution {
  const out: Distribution = {};
  for (const name of FACETS) {
    const counts: Record<string, number> = {};
    for (const doc of docs) {
      const value = doc[name];
      for (const v of new Set(Array.isArray(value) ? value : [value]))
        if (typeof v === 'string' && v) counts[v] = (counts[v] ?? 0) + 1;
    }
    out[name] = counts;
  }
  return out;
}

function emptyResult(query: SearchQuery): SearchResult {
  return {
    query: query.q,
    correctedQuery: null,
    suggestions: [],
    total: { value: 0, exact: true },
    page: query.page,
    pageSize: query.pageSize,
    items: [],
    facets: { kind: [], category: [], severity: [], status: [], tag: [], part: [], project: [] },
    facetsApproximate: false,
    backend: 'meilisearch',
  };
}

function highlighting(text: string): Partial<SearchParams> {
  if (!text) return {};
  return {
    attributesToHighlight: ['title', 'body'],
    attributesToCrop: ['body'],
    cropLength: SNIPPET_WORDS,
    cropMarker: '…',
    highlightPreTag: MARK_OPEN,
    highlightPostTag: MARK_CLOSE,
  };
}

function hitOf(hit: Hit<MeiliDocument>, highlighted: boolean): SearchHit {
  const formatted = hit._formatted;
  return {
    kind: hit.kind,
    id: hit.ref_id,
    title: hit.title,
    titleHtml:
      highlighted && typeof formatted?.title === 'string' ? markedHtml(formatted.title) : escapeHtml(hit.title),
    snippetHtml: highlighted && typeof formatted?.body === 'string' ? markedHtml(formatted.body) : '',
    url: hit.url,
    project: hit.project_slug && hit.project_title ? { slug: hit.project_slug, title: hit.project_title } : null,
    category: hit.category,
    severity: hit.severity,
    status: hit.status,
    tags: hit.tags,
    parts: hit.parts,
    pins: hit.pins,
    updatedAt: new Date(hit.updated_at).toISOString(),
  };
}

const andFilter = (filter: string, clause: string) => (filter ? `(${filter}) AND ${clause}` : clause);

export interface MeilisearchOptions {
  url: string;
  apiKey?: string;
  /** Index uid (default `reworkbook`). */
  index?: string;
  /** How long one HTTP request and one task may take (ms). */
  requestTimeoutMs?: number;
  taskTimeoutMs?: number;
}

export class MeilisearchSearch implements SearchBackend {
  readonly name = 'meilisearch' as const;
  readonly indexUid: string;
  private readonly client: Meilisearch;
  private readonly index: Index<MeiliDocument>;
  private ready: Promise<void> | null = null;

  constructor(options: MeilisearchOptions) {
    this.indexUid = options.index ?? DEFAULT_INDEX;
    this.client = new Meilisearch({
      host: options.url,
      ...(options.apiKey ? { apiKey: options.apiKey } : {}),
      timeout: options.requestTimeoutMs ?? 15_000,
      defaultWaitOptions: { timeout: options.taskTimeoutMs ?? 60_000, interval: 50 },
    });
    this.index = this.client.index<MeiliDocument>(this.indexUid);
  }

  /** Create the index and apply the settings, once per process (again after a failure). */
  private prepare(): Promise<void> {
    this.ready ??= (async () => {
      const created = await this.client.createIndex(this.indexUid, { primaryKey: 'id' }).waitTask();
      if (created.status !== 'succeeded' && created.error?.code !== 'index_already_exists') {
        throw new Error(
          `Meilisearch could not create the index ${this.indexUid}: ${created.error?.message ?? created.status}`,
        );
      }
      await settled(this.index.updateSettings(INDEX_SETTINGS), 'apply the index settings');
    })().catch((error: unknown) => {
      this.ready = null;
      throw error;
    });
    return this.ready;
  }

  async upsert(docs: SearchDocument[]): Promise<void> {
    if (!docs.length) return;
    await this.prepare();
    for (let at = 0; at < docs.length; at += UPSERT_BATCH) {
      const batch = docs.slice(at, at + UPSERT_BATCH).map(toMeiliDocument);
      await settled(this.index.addDocuments(batch, { primaryKey: 'id' }), `index ${batch.length} documents`);
    }
  }

  async remove(refs: Array<{ kind: SearchDocument['kind']; refId: number }>): Promise<void> {
    if (!refs.length) return;
    await this.prepare();
    await settled(
      this.index.deleteDocuments(refs.map((r) => `${r.kind}-${r.refId}`)),
      `remove ${refs.length} documents`,
    );
  }

  async clear(): Promise<void> {
    await this.prepare();
    await settled(this.index.deleteAllDocuments(), 'clear the index');
  }

  /** How many documents the index holds (for the reindex report). */
  async documentCount(): Promise<number> {
    await this.prepare();
    return (await this.index.getStats()).numberOfDocuments;
  }

  async search(query: SearchQuery, viewer: SearchViewer): Promise<SearchResult> {
    const filter = filterFor(query, viewer);
    const exact = wantsExact(query);
    const normalized = normalizeForSearch(query.q).trim();
    const text = exact ? asPhrases(normalized) : normalized;
    // Nothing can match, or nothing searchable was typed (only punctuation).
    if (filter === null || (text && !/[\p{L}\p{N}]/u.test(text))) return emptyResult(query);
    await this.prepare();
    const alternatives = alternativesOf(text);
    if (alternatives.length > 1) return this.searchAlternatives(query, alternatives.slice(0, MAX_ALTERNATIVES), filter);
    const strict = await this.searchAll(query, text, filter);
    const words = text.split(/\s+/);
    if (
      query.page === 1 &&
      strict.total.value > 0 &&
      strict.total.value < query.pageSize &&
      words.length > 1 &&
      !exact &&
      plainWords(text)
    ) {
      return this.widen(query, strict, words, filter);
    }
    return strict;
  }

  private async searchAll(query: SearchQuery, text: string, filter: string): Promise<SearchResult> {
    const offset = (query.page - 1) * query.pageSize;
    const response = await this.index.search(text, {
      ...(filter ? { filter } : {}),
      facets: [...FACETS],
      offset,
      limit: query.pageSize,
      sort: ['updated_at:desc'],
      matchingStrategy: 'all',
      attributesToRetrieve: RETRIEVE,
      ...highlighting(text),
    });
    const hits = response.hits;
    const estimated = response.estimatedTotalHits ?? 0;
    // Past the last hit the count is known; before it Meilisearch only estimates.
    const seenEnd = hits.length < query.pageSize && (hits.length > 0 || offset === 0);
    return {
      ...emptyResult(query),
      total: seenEnd
        ? { value: offset + hits.length, exact: true }
        : { value: Math.max(estimated, offset + hits.length), exact: false },
      items: hits.map((hit) => hitOf(hit, Boolean(text))),
      facets: facetsOf((response.facetDistribution ?? {}) as Distribution),
    };
  }

  /** OR: one search per alternative, merged by rank; see the comment at the top. */
  private async searchAlternatives(query: SearchQuery, alternatives: string[], filter: string): Promise<SearchResult> {
    const candidates = await Promise.all(
      alternatives.map((alternative) =>
        this.index.search(alternative, {
          ...(filter ? { filter } : {}),
          limit: OR_CANDIDATES,
          sort: ['updated_at:desc'],
          matchingStrategy: 'all',
          attributesToRetrieve: FACET_FIELDS,
        }),
      ),
    );
    const merged = new Map<string, { doc: Partial<MeiliDocument>; rank: number; alternative: number }>();
    candidates.forEach((response: SearchResponse<MeiliDocument>, alternative) => {
      response.hits.forEach((doc, rank) => {
        const seen = merged.get(doc.id);
        if (!seen || rank < seen.rank) merged.set(doc.id, { doc, rank, alternative });
      });
    });
    const ordered = [...merged.values()].sort((a, b) => a.rank - b.rank || a.alternative - b.alternative);
    const capped = candidates.some((r) => (r.estimatedTotalHits ?? 0) > r.hits.length);
    const offset = (query.page - 1) * query.pageSize;
    const pageEntries = ordered.slice(offset, offset + query.pageSize);

    // The page again, with highlights, each hit from the alternative it ranked best in.
    const full = new Map<string, Hit<MeiliDocument>>();
    await Promise.all(
      alternatives.map(async (alternative, i) => {
        const ids = pageEntries.filter((e) => e.alternative === i).map((e) => e.doc.id!);
        if (!ids.length) return;
        const response = await this.index.search(alternative, {
          filter: andFilter(filter, inList('id', ids)),
          limit: ids.length,
          matchingStrategy: 'all',
          attributesToRetrieve: RETRIEVE,
          ...highlighting(alternative),
        });
        for (const hit of response.hits) full.set(hit.id, hit);
      }),
    );
    const maxEstimate = Math.max(0, ...candidates.map((r) => r.estimatedTotalHits ?? 0));
    return {
      ...emptyResult(query),
      total: capped ? { value: Math.max(merged.size, maxEstimate), exact: false } : { value: merged.size, exact: true },
      items: pageEntries.flatMap((e) => {
        const hit = full.get(e.doc.id!);
        // Gone between the two requests: leave it out rather than show a half-empty hit.
        return hit ? [hitOf(hit, true)] : [];
      }),
      facets: facetsOf(distributionOf(ordered.map((e) => e.doc))),
      facetsApproximate: capped,
    };
  }

  /** Few items have every word: add those with some of them after (as PostgreSQL does). */
  private async widen(
    query: SearchQuery,
    strict: SearchResult,
    words: string[],
    filter: string,
  ): Promise<SearchResult> {
    const loose = await this.searchAlternatives({ ...query, page: 1 }, words.slice(0, MAX_ALTERNATIVES), filter);
    const seen = new Set(strict.items.map((i) => `${i.kind}:${i.id}`));
    const extra = loose.items.filter((i) => !seen.has(`${i.kind}:${i.id}`));
    // The widened set contains the strict one: its total and facets describe what is listed.
    return {
      ...strict,
      items: [...strict.items, ...extra].slice(0, query.pageSize),
      total: loose.total,
      facets: loose.facets,
      facetsApproximate: loose.facetsApproximate,
    };
  }
}

async function settled(task: EnqueuedTaskPromise, what: string): Promise<void> {
  const done = await task.waitTask();
  if (done.status !== 'succeeded')
    throw new Error(`Meilisearch could not ${what}: ${done.error?.message ?? `task ${done.uid} ${done.status}`}`);
}

/** The Meilisearch backend when MEILISEARCH_URL is set; null means PostgreSQL answers searches. */
export function createSearchBackend(config: Pick<Config, 'MEILISEARCH_URL' | 'MEILISEARCH_KEY'>): SearchBackend | null {
  if (!config.MEILISEARCH_URL) return null;
  return new MeilisearchSearch({
    url: config.MEILISEARCH_URL,
    ...(config.MEILISEARCH_KEY ? { apiKey: config.MEILISEARCH_KEY } : {}),
  });
}
