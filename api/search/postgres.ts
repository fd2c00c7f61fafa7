/**
 * PostgreSQL full-text search, designed for the case that is slow by default: a common word
 * matching most of 100,000 rows, where ranking every match with ts_rank costs hundreds of
 * milliseconds. Instead a bounded candidate set is ranked in two passes, in one statement:
 *
 * 1. candidates: the newest CANDIDATES rows whose full text matches, plus the newest
 *    TITLE_CANDIDATES whose titles, part numbers or pin labels match (a small index, so strong
 *    matches are never crowded out by recency). The newest matches are found by walking the
 *    updated_at index (common words) or through the RUM index, whose postings carry each item's
 *    time (rarer words) — `chooseStrategy` says which from the planner's estimate;
 * 2. ranking: ts_rank_cd with weights over the candidates only; the page, its highlighted
 *    snippets and the facets over the same set.
 *
 * When fewer rows match than the bound, the result is exact; otherwise totals and facets say
 * they are approximate. Queries use websearch syntax (phrases, -exclusion, OR) over the English
 * configuration, plus the normalized part-number lexemes of shared/search/normalize.ts.
 */
import { sql, type SQL } from 'drizzle-orm';
import type { Db } from '../../db/client';
import type { Facet, SearchHit, SearchQuery, SearchResult } from '../../shared/contracts/search';
import { searchKindLabels } from '../../shared/contracts/search';
import { erratumStatusLabels, severityLabels, type ErratumStatus, type Severity } from '../../shared/domain';
import { normalizeForSearch, vocabularyOf } from '../../shared/search/normalize';
import type { SearchBackend, SearchViewer } from './backend';
import type { SearchDocument } from './documents';

export const CANDIDATES = 400;
export const TITLE_CANDIDATES = 150;

/** The candidate bounds; the benchmark widens them to measure what the bound costs in relevance. */
export interface CandidateBounds {
  candidates: number;
  titleCandidates: number;
}
const DEFAULT_BOUNDS: CandidateBounds = { candidates: CANDIDATES, titleCandidates: TITLE_CANDIDATES };
/** Bodies are kept whole in the tsvector; the stored copy only feeds snippets. */
const SNIPPET_SOURCE_CHARS = 20_000;
const UPSERT_BATCH = 200;
export const MARK_OPEN = '\u0001';
export const MARK_CLOSE = '\u0002';

export const escapeHtml = (s: string) =>
  s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
/** Escapes everything, then turns the markers ts_headline put around matches into <mark>. */
export function markedHtml(text: string): string {
  return escapeHtml(text).replaceAll(MARK_OPEN, '<mark>').replaceAll(MARK_CLOSE, '</mark>');
}

/**
 * The tsquery for what the reader typed: websearch syntax over the normalized text; the last
 * word also matches as a prefix while typing (`atmeg` finds ATmega328P).
 */
export function tsqueryFor(raw: string): SQL | null {
  const q = normalizeForSearch(raw).trim();
  if (!q) return null;
  const full = sql`websearch_to_tsquery('english', ${q})`;
  // Prefix matching only for plain words: with phrases, exclusions or OR the reader is precise.
  if (/["]|(^|\s)-|\sOR\s/i.test(q)) return full;
  const last = q.match(/(?:^|\s)([A-Za-z0-9]{3,32})$/)?.[1];
  if (!last) return full;
  const rest = q.slice(0, q.length - last.length).trim();
  // A stopword ("only") is not in the index, so it must not be required as a prefix either.
  const lastQuery = sql`(CASE WHEN numnode(websearch_to_tsquery('english', ${last})) = 0 THEN ''::tsquery
    ELSE websearch_to_tsquery('english', ${last}) || to_tsquery('simple', ${last.toLowerCase() + ':*'}) END)`;
  return rest ? sql`(websearch_to_tsquery('english', ${rest}) && ${lastQuery})` : lastQuery;
}

function visibleTo(viewer: SearchViewer): SQL {
  if (viewer.admin) return sql`true`;
  if (!viewer.memberProjectIds.length) return sql`d.visible`;
  const ids = JSON.stringify(viewer.memberProjectIds.map(Number));
  return sql`(d.visible OR d.project_id IN (SELECT (jsonb_array_elements_text(${ids}::jsonb))::int))`;
}

function filtersOf(query: SearchQuery): SQL {
  const parts: SQL[] = [];
  const kinds = query.mistakes
    ? query.kind.length
      ? query.kind.filter((k) => k === 'erratum' || k === 'lesson')
      : ['erratum', 'lesson']
    : query.kind;
  if (kinds.length)
    parts.push(
      sql`d.kind IN (${sql.join(
        kinds.map((k) => sql`${k}`),
        sql`, `,
      )})`,
    );
  if (query.category.length)
    parts.push(
      sql`d.category IN (${sql.join(
        query.category.map((v) => sql`${v}`),
        sql`, `,
      )})`,
    );
  if (query.severity.length)
    parts.push(
      sql`d.severity IN (${sql.join(
        query.severity.map((v) => sql`${v}`),
        sql`, `,
      )})`,
    );
  if (query.status.length)
    parts.push(
      sql`d.status IN (${sql.join(
        query.status.map((v) => sql`${v}`),
        sql`, `,
      )})`,
    );
  if (query.project.length)
    parts.push(
      sql`d.project_slug IN (${sql.join(
        query.project.map((v) => sql`${v}`),
        sql`, `,
      )})`,
    );
  if (query.tag.length) parts.push(sql`d.tags && ${textArray(query.tag)}`);
  if (query.part.length) parts.push(sql`d.parts && ${textArray(query.part)}`);
  return parts.length ? sql.join(parts, sql` AND `) : sql`true`;
}

/** A text[] built from a JSON parameter: values are never spliced into the SQL text. */
function textArray(values: readonly string[]): SQL {
  return sql`ARRAY(SELECT jsonb_array_elements_text(${JSON.stringify(values)}::jsonb))::text[]`;
}

/** How the newest matches are found: see `strategyFor`. */
export type CandidateStrategy = 'walk' | 'rum';

/** The RUM index of migration 0012, when the server has the extension. */
export const RUM_INDEX = 'search_docs_tsv_rum_idx';

/**
 * What checking one row costs on the newest-first walk (fetching and matching its tsvector),
 * in RUM items (what the RUM scan spends per match, sorting its matches by time). Measured on
 * the 100,000-item benchmark corpus: about 8.6 µs against 0.27 µs (docs/benchmarks.md).
 */
export const WALK_COST_IN_RUM_ITEMS = 32;

/**
 * Newest-first walk or RUM scan. The walk reads the updated_at index from the newest item and
 * checks each row until CANDIDATES match: cheap for a common word (nearly every row matches),
 * slow for a word in one item of twenty (twenty rows read per match). The RUM scan collects every
 * match from the index with its time and sorts them: cheap for a few thousand, slow for a word in
 * every item. With M matches of N items the walk costs about CANDIDATES·N/M rows and the scan
 * M items; the walk wins when M² ≥ CANDIDATES·N·WALK_COST_IN_RUM_ITEMS. M is the planner's
 * estimate (EXPLAIN, from the column's statistics), N the table's row estimate.
 */
export function chooseStrategy(estimatedMatches: number, items: number, candidates = CANDIDATES): CandidateStrategy {
  return estimatedMatches * estimatedMatches >= candidates * WALK_COST_IN_RUM_ITEMS * items ? 'walk' : 'rum';
}

type ItemJson = {
  kind: SearchHit['kind'];
  id: number;
  title: string;
  url: string;
  project_slug: string | null;
  project_title: string | null;
  category: string | null;
  severity: Severity | null;
  status: ErratumStatus | null;
  tags: string[];
  parts: string[];
  pins: string[];
  updated_ms: number;
  title_marked: string | null;
  snippet_marked: string | null;
};
type FacetJson = Array<{ value: string; label: string | null; count: number }>;
type StatementRow = {
  total: number;
  full_count: number;
  items: ItemJson[];
  kind: FacetJson;
  category: FacetJson;
  severity: FacetJson;
  status: FacetJson;
  tag: FacetJson;
  part: FacetJson;
  project: FacetJson;
};

const FACET_SIZE = 30;
const HEADLINE_OPTIONS = `StartSel=${MARK_OPEN}, StopSel=${MARK_CLOSE}, MaxWords=30, MinWords=12, MaxFragments=2, FragmentDelimiter=" … "`;
const TITLE_HEADLINE_OPTIONS = `StartSel=${MARK_OPEN}, StopSel=${MARK_CLOSE}, HighlightAll=true`;

/** A facet's values and counts over the ranked candidates, commonest first. */
function facetSql(values: SQL, label: SQL = sql`NULL::text`, join: SQL = sql``, extra: SQL = sql``): SQL {
  return sql`(SELECT coalesce(json_agg(json_build_object('value', f.value, 'label', ${label}, 'count', f.count)
      ORDER BY f.count DESC, f.value), '[]'::json)
    FROM (SELECT r.v AS value, count(*)::int AS count ${extra} FROM ${values} GROUP BY r.v ORDER BY 2 DESC, 1 LIMIT ${FACET_SIZE}) f ${join})`;
}

/**
 * The whole search in one statement: the bounded candidate set (pass one), ranked (pass two),
 * the page with its highlighted title and snippet, the total and every facet over the same set.
 * Exported so the benchmark can time the database's share of a search on its own.
 */
export function searchStatement(
  query: SearchQuery,
  viewer: SearchViewer,
  text: string,
  strategy: CandidateStrategy,
  bounds: CandidateBounds = DEFAULT_BOUNDS,
): SQL {
  const tsquery = tsqueryFor(text);
  const where = sql`${visibleTo(viewer)} AND ${filtersOf(query)}`;
  // The tsquery is written out where it is used, not taken from a CTE: the planner then sees
  // the words and estimates how many rows match.
  const q = tsquery ? sql`(${tsquery})` : sql`''::tsquery`;
  // Without words: browse the newest visible items under the filters.
  const matchFull = tsquery ? sql`d.tsv @@ ${q}` : sql`true`;
  // Newest first: through the RUM index's attached times (distance to a date far ahead), or
  // by walking the updated_at index (the planner may also take GIN without RUM).
  const order =
    strategy === 'rum' && tsquery ? sql`d.updated_at <=| '9999-12-31'::timestamptz` : sql`d.updated_at DESC`;
  // A title holds a subset of the item's words at the same positions, so a query without an
  // exclusion that matches the title matches the item; with one, the item is checked too.
  const excludes = /(^|\s)-\S/.test(normalizeForSearch(text));
  const matchTitle = tsquery
    ? excludes
      ? sql`d.title_tsv @@ ${q} AND d.tsv @@ ${q}`
      : sql`d.title_tsv @@ ${q}`
    : sql`false`;
  const rank = tsquery ? sql`ts_rank_cd('{0.1,0.2,0.4,1.0}', d.tsv, ${q})` : sql`0::real`;
  const titleMarked = tsquery ? sql`ts_headline('english', p.title, ${q}, ${TITLE_HEADLINE_OPTIONS})` : sql`NULL::text`;
  const snippetMarked = tsquery ? sql`ts_headline('english', d.body, ${q}, ${HEADLINE_OPTIONS})` : sql`NULL::text`;
  return sql`
      WITH full_hits AS (
        SELECT d.id FROM search_docs d WHERE ${matchFull} AND ${where} ORDER BY ${order} LIMIT ${bounds.candidates}
      ),
      title_hits AS (
        SELECT d.id FROM search_docs d WHERE ${matchTitle} AND ${where} ORDER BY d.updated_at DESC LIMIT ${bounds.titleCandidates}
      ),
      candidates AS (
        SELECT id, true AS from_full FROM full_hits
        UNION ALL SELECT id, false FROM title_hits WHERE id NOT IN (SELECT id FROM full_hits)
      ),
      ranked AS MATERIALIZED (
        SELECT d.id, d.kind, d.ref_id, ${rank} AS rank, d.title, d.url, d.project_slug, d.project_title, d.category,
               d.severity, d.status, d.tags, d.parts, d.pins, d.updated_at, c.from_full
        FROM candidates c JOIN search_docs d ON d.id = c.id
      ),
      page AS (
        SELECT * FROM ranked ORDER BY rank DESC, updated_at DESC, id DESC
        LIMIT ${query.pageSize} OFFSET ${(query.page - 1) * query.pageSize}
      )
      SELECT
        (SELECT count(*)::int FROM ranked) AS total,
        (SELECT count(*)::int FROM ranked WHERE from_full) AS full_count,
        (SELECT coalesce(json_agg(json_build_object(
            'kind', p.kind, 'id', p.ref_id, 'title', p.title, 'url', p.url,
            'project_slug', p.project_slug, 'project_title', p.project_title, 'category', p.category,
            'severity', p.severity, 'status', p.status, 'tags', p.tags, 'parts', p.parts, 'pins', p.pins,
            'updated_ms', extract(epoch FROM p.updated_at) * 1000,
            'title_marked', ${titleMarked}, 'snippet_marked', ${snippetMarked}
          ) ORDER BY p.rank DESC, p.updated_at DESC, p.id DESC), '[]'::json)
         FROM page p JOIN search_docs d ON d.id = p.id) AS items,
        ${facetSql(sql`(SELECT kind AS v FROM ranked) r`)} AS kind,
        ${facetSql(sql`(SELECT category AS v FROM ranked WHERE category IS NOT NULL) r`, sql`c.name`, sql`LEFT JOIN categories c ON c.slug = f.value`)} AS category,
        ${facetSql(sql`(SELECT severity AS v FROM ranked WHERE severity IS NOT NULL) r`)} AS severity,
        ${facetSql(sql`(SELECT status AS v FROM ranked WHERE status IS NOT NULL) r`)} AS status,
        ${facetSql(sql`(SELECT unnest(tags) AS v FROM ranked) r`, sql`t.name`, sql`LEFT JOIN tags t ON t.slug = f.value`)} AS tag,
        ${facetSql(sql`(SELECT unnest(parts) AS v FROM ranked) r`)} AS part,
        ${facetSql(sql`(SELECT project_slug AS v, project_title FROM ranked WHERE project_slug IS NOT NULL) r`, sql`f.label`, sql``, sql`, max(r.project_title) AS label`)} AS project`;
}

const toFacet = (rows: FacetJson, label: (row: FacetJson[number]) => string): Facet =>
  rows.map((row) => ({ value: row.value, label: label(row), count: row.count }));

export class PostgresSearch implements SearchBackend {
  readonly name = 'postgres' as const;
  /** Whether the RUM index exists, once looked up. */
  private rum: Promise<boolean> | null = null;
  /** The table's row estimate and when it was read. */
  private items = { estimate: 0, at: 0 };

  constructor(
    private readonly db: Db,
    private readonly bounds: CandidateBounds = DEFAULT_BOUNDS,
  ) {}

  async upsert(docs: SearchDocument[]): Promise<void> {
    // Batched: one statement per UPSERT_BATCH documents, the tsvectors computed in SQL.
    for (let at = 0; at < docs.length; at += UPSERT_BATCH) {
      const batch = docs.slice(at, at + UPSERT_BATCH).map((doc) => ({
        kind: doc.kind,
        ref_id: doc.refId,
        project_id: doc.projectId,
        visible: doc.visible,
        title: doc.title,
        body: doc.body.slice(0, SNIPPET_SOURCE_CHARS),
        url: doc.url,
        project_slug: doc.projectSlug,
        project_title: doc.projectTitle,
        category: doc.category,
        severity: doc.severity,
        status: doc.status,
        tags: doc.tags,
        parts: doc.parts,
        pins: doc.pins,
        a: normalizeForSearch(doc.weighted.a),
        b: normalizeForSearch(doc.weighted.b),
        c: normalizeForSearch(doc.weighted.c),
        d: normalizeForSearch(doc.weighted.d),
        // Codes go in as text (the simple configuration keeps them as they are) so they get
        // positions: lexemes without positions carry no weight and no cover for ranking.
        codes_a: doc.codes.a.join(' '),
        codes_c: doc.codes.c.join(' '),
        updated_at: doc.updatedAt.toISOString(),
      }));
      const arr = (field: string) => sql.raw(`ARRAY(SELECT jsonb_array_elements_text(r.${field}))::text[]`);
      await this.db.execute(sql`
        INSERT INTO search_docs (kind, ref_id, project_id, visible, title, body, url, project_slug, project_title,
          category, severity, status, tags, parts, pins, tsv, title_tsv, updated_at)
        SELECT r.kind, r.ref_id, r.project_id, r.visible, r.title, r.body, r.url, r.project_slug, r.project_title,
          r.category, r.severity, r.status, ${arr('tags')}, ${arr('parts')}, ${arr('pins')},
          setweight(to_tsvector('english', r.a), 'A') || setweight(to_tsvector('simple', r.codes_a), 'A')
            || setweight(to_tsvector('english', r.b), 'B')
            || setweight(to_tsvector('english', r.c), 'C') || setweight(to_tsvector('simple', r.codes_c), 'C')
            || setweight(to_tsvector('english', r.d), 'D'),
          setweight(to_tsvector('english', r.a), 'A') || setweight(to_tsvector('simple', r.codes_a), 'A'),
          r.updated_at
        FROM jsonb_to_recordset(${JSON.stringify(batch)}::jsonb) AS r(
          kind text, ref_id int, project_id int, visible boolean, title text, body text, url text, project_slug text,
          project_title text, category text, severity text, status text, tags jsonb, parts jsonb, pins jsonb,
          a text, b text, c text, d text, codes_a text, codes_c text, updated_at timestamptz)
        ON CONFLICT (kind, ref_id) DO UPDATE SET
          project_id = EXCLUDED.project_id, visible = EXCLUDED.visible, title = EXCLUDED.title, body = EXCLUDED.body,
          url = EXCLUDED.url, project_slug = EXCLUDED.project_slug, project_title = EXCLUDED.project_title,
          category = EXCLUDED.category, severity = EXCLUDED.severity, status = EXCLUDED.status, tags = EXCLUDED.tags,
          parts = EXCLUDED.parts, pins = EXCLUDED.pins, tsv = EXCLUDED.tsv, title_tsv = EXCLUDED.title_tsv,
          updated_at = EXCLUDED.updated_at`);
      const terms = [
        ...new Set(
          docs
            .slice(at, at + UPSERT_BATCH)
            .flatMap((doc) =>
              vocabularyOf(
                `${doc.title} ${doc.parts.join(' ')} ${doc.pins.join(' ')} ${doc.tags.join(' ').replace(/-/g, ' ')}`,
              ),
            ),
        ),
      ];
      if (terms.length) {
        await this.db.execute(sql`
          INSERT INTO search_terms (term, docs) SELECT t, 1 FROM unnest(${textArray(terms)}) AS t
          ON CONFLICT (term) DO UPDATE SET docs = search_terms.docs + 1`);
      }
    }
  }

  async remove(refs: Array<{ kind: SearchDocument['kind']; refId: number }>): Promise<void> {
    if (!refs.length) return;
    await this.db.execute(sql`
      DELETE FROM search_docs d USING jsonb_to_recordset(${JSON.stringify(refs)}::jsonb) AS r(kind text, "refId" int)
      WHERE d.kind = r.kind AND d.ref_id = r."refId"`);
  }

  async clear(): Promise<void> {
    await this.db.execute(sql`TRUNCATE search_docs, search_terms`);
  }

  async search(query: SearchQuery, viewer: SearchViewer): Promise<SearchResult> {
    const first = await this.run(query, viewer, query.q);
    if (query.exact) return first;
    if (first.total.value > 0 && first.total.value < query.pageSize && query.page === 1)
      return this.widen(query, viewer, first);
    if (first.total.value > 0 || !query.q.trim()) return first;
    // Nothing matched: try the closest known words for likely typos ("atmaga328" → atmega328p).
    const corrected = await this.correct(query.q);
    if (corrected && corrected !== normalizeForSearch(query.q).toLowerCase()) {
      const second = await this.run(query, viewer, corrected);
      if (second.total.value > 0) return { ...second, query: query.q, correctedQuery: corrected };
    }
    return { ...first, suggestions: await this.suggest(query.q) };
  }

  /** Whether the RUM index exists (looked up once it could be; a failed look-up is tried again). */
  private hasRum(): Promise<boolean> {
    this.rum ??= this.db
      .execute<{ found: boolean }>(
        sql`SELECT EXISTS (SELECT 1 FROM pg_indexes WHERE indexname = ${RUM_INDEX}) AS found`,
      )
      .then(
        (r) => r.rows[0]?.found === true,
        (error: unknown) => {
          this.rum = null;
          throw error;
        },
      );
    return this.rum;
  }

  /** The table's row estimate (from the statistics), read again after a minute. */
  private async itemEstimate(): Promise<number> {
    if (Date.now() - this.items.at > 60_000) {
      const r = await this.db.execute<{ n: number }>(
        sql`SELECT greatest(reltuples, 0)::float8 AS n FROM pg_class WHERE oid = 'search_docs'::regclass`,
      );
      this.items = { estimate: Number(r.rows[0]?.n ?? 0), at: Date.now() };
    }
    return this.items.estimate;
  }

  /** Walk or RUM scan for this text (see `chooseStrategy`). */
  async strategyFor(text: string): Promise<CandidateStrategy> {
    const tsquery = tsqueryFor(text);
    if (!tsquery || !(await this.hasRum())) return 'walk';
    const plan = await this.db.execute<{ 'QUERY PLAN': Array<{ Plan: { 'Plan Rows': number } }> }>(
      sql`EXPLAIN (FORMAT JSON) SELECT 1 FROM search_docs d WHERE d.tsv @@ (${tsquery})`,
    );
    const estimate = plan.rows[0]?.['QUERY PLAN'][0]?.Plan['Plan Rows'] ?? 0;
    return chooseStrategy(estimate, await this.itemEstimate(), this.bounds.candidates);
  }

  /** Picks the strategy (the planner's estimate), then builds the search statement; the benchmark times both. */
  async statementFor(query: SearchQuery, viewer: SearchViewer, text: string): Promise<SQL> {
    return searchStatement(query, viewer, text, await this.strategyFor(text), this.bounds);
  }

  private async run(query: SearchQuery, viewer: SearchViewer, text: string): Promise<SearchResult> {
    const empty: SearchResult = {
      query: query.q,
      correctedQuery: null,
      suggestions: [],
      total: { value: 0, exact: true },
      page: query.page,
      pageSize: query.pageSize,
      items: [],
      facets: { kind: [], category: [], severity: [], status: [], tag: [], part: [], project: [] },
      facetsApproximate: false,
      backend: this.name,
    };
    const result = await this.db.execute<StatementRow>(await this.statementFor(query, viewer, text));
    const row = result.rows[0];
    if (!row || !row.total) return empty;
    const capped = row.full_count >= this.bounds.candidates;
    const same = (r: FacetJson[number]) => r.label ?? r.value;
    return {
      ...empty,
      total: { value: row.total, exact: !capped },
      items: row.items.map((r) => ({
        kind: r.kind,
        id: r.id,
        title: r.title,
        titleHtml: r.title_marked === null ? escapeHtml(r.title) : markedHtml(r.title_marked),
        snippetHtml: r.snippet_marked === null ? '' : markedHtml(r.snippet_marked),
        url: r.url,
        project: r.project_slug && r.project_title ? { slug: r.project_slug, title: r.project_title } : null,
        category: r.category,
        severity: r.severity,
        status: r.status,
        tags: r.tags,
        parts: r.parts,
        pins: r.pins,
        updatedAt: new Date(r.updated_ms).toISOString(),
      })),
      facets: {
        kind: toFacet(row.kind, (r) => searchKindLabels[r.value as SearchHit['kind']] ?? r.value),
        category: toFacet(row.category, same),
        severity: toFacet(row.severity, (r) => severityLabels[r.value as Severity]?.split(' —')[0] ?? r.value),
        status: toFacet(row.status, (r) => erratumStatusLabels[r.value as ErratumStatus] ?? r.value),
        tag: toFacet(row.tag, same),
        part: toFacet(row.part, same),
        project: toFacet(row.project, same),
      },
      facetsApproximate: capped,
    };
  }

  /**
   * Few items have every word: also show items with most of them, after those (recall for
   * readers whose words are not the writer's, e.g. "Kelvin" where the erratum says "sense wires").
   */
  private async widen(query: SearchQuery, viewer: SearchViewer, strict: SearchResult): Promise<SearchResult> {
    const words = normalizeForSearch(query.q).trim().split(/\s+/);
    if (words.length < 2 || /["]|(^|\s)-|\sOR\s/i.test(query.q)) return strict;
    const loose = await this.run(query, viewer, words.join(' OR '));
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

  /** Replace each unknown word by the most similar known one, if any is close enough. */
  private async correct(raw: string): Promise<string | null> {
    const words = normalizeForSearch(raw).toLowerCase().split(/\s+/).filter(Boolean);
    let changed = false;
    const out: string[] = [];
    for (const word of words) {
      const bare = word.replace(/^[-"]+|["]+$/g, '');
      if (bare.length < 4 || bare === 'or' || !/^[a-z0-9]+$/.test(bare)) {
        out.push(word);
        continue;
      }
      const known = await this.db.execute(sql`SELECT 1 FROM search_terms WHERE term = ${bare}`);
      if (known.rows.length) {
        out.push(word);
        continue;
      }
      const best = await this.db.execute<{ term: string }>(sql`
        SELECT term FROM search_terms WHERE term % ${bare} ORDER BY similarity(term, ${bare}) DESC, docs DESC LIMIT 1`);
      const term = best.rows[0]?.term;
      if (term) {
        out.push(word.replace(bare, term));
        changed = true;
      } else out.push(word);
    }
    return changed ? out.join(' ') : null;
  }

  private async suggest(raw: string): Promise<string[]> {
    const word =
      normalizeForSearch(raw)
        .toLowerCase()
        .replace(/[^a-z0-9 ]+/g, ' ')
        .trim()
        .split(/\s+/)
        .pop() ?? '';
    if (word.length < 3) return [];
    const rows = await this.db.execute<{ term: string }>(sql`
      SELECT term FROM search_terms WHERE term % ${word} ORDER BY similarity(term, ${word}) DESC, docs DESC LIMIT 3`);
    return rows.rows.map((r) => r.term);
  }
}
