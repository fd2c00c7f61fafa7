/**
 * PostgreSQL full-text search, designed for the case that is slow by default: a common word
 * matching most of 100,000 rows, where ranking every match with ts_rank costs hundreds of
 * milliseconds. Instead a bounded candidate set is ranked in two passes:
 *
 * 1. candidates: the newest CANDIDATES rows whose full text matches, plus the newest
 *    TITLE_CANDIDATES whose titles, part numbers or pin labels match (a small index, so strong
 *    matches are never crowded out by recency);
 * 2. ranking: ts_rank_cd with weights over the candidates only; facets over the same set.
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

export const CANDIDATES = 600;
export const TITLE_CANDIDATES = 200;
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

type CandidateRow = {
  id: number;
  kind: SearchHit['kind'];
  ref_id: number;
  rank: number;
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
  updated_at: Date;
  from_full: boolean;
};

function facet(values: Array<string | null | undefined>, label: (v: string) => string = (v) => v): Facet {
  const counts = new Map<string, number>();
  for (const v of values) if (v) counts.set(v, (counts.get(v) ?? 0) + 1);
  return [...counts.entries()]
    .sort((a, b) => b[1] - a[1] || a[0].localeCompare(b[0]))
    .slice(0, 30)
    .map(([value, count]) => ({ value, label: label(value), count }));
}

/**
 * Pass one and two in one statement: the bounded candidate set and its ranks. Exported so the
 * benchmark can time the database's share of a search on its own.
 */
export function candidateQuery(query: SearchQuery, viewer: SearchViewer, text: string): SQL {
  const tsquery = tsqueryFor(text);
  const where = sql`${visibleTo(viewer)} AND ${filtersOf(query)}`;
  // Without words: browse the newest visible items under the filters.
  // The tsquery is written out where it is used, not taken from a CTE: the planner then sees
  // the words and estimates how many rows match. A common word (most of the table) is read
  // newest first through the updated_at index until the bound is reached; a rare one through
  // the GIN index. Behind a CTE every query got the GIN plan, and a common word cost a bitmap
  // scan over nearly every row.
  const q = tsquery ? sql`(${tsquery})` : sql`''::tsquery`;
  const matchFull = tsquery ? sql`d.tsv @@ ${q}` : sql`true`;
  // Titles must match the whole query too (an exclusion may rest on words outside the title).
  const matchTitle = tsquery ? sql`d.title_tsv @@ ${q} AND d.tsv @@ ${q}` : sql`false`;
  const rank = tsquery ? sql`ts_rank_cd('{0.1,0.2,0.4,1.0}', d.tsv, ${q})` : sql`0`;
  return sql`
      WITH full_hits AS (
        SELECT d.id FROM search_docs d WHERE ${matchFull} AND ${where} ORDER BY d.updated_at DESC LIMIT ${CANDIDATES}
      ),
      title_hits AS (
        SELECT d.id FROM search_docs d WHERE ${matchTitle} AND ${where} ORDER BY d.updated_at DESC LIMIT ${TITLE_CANDIDATES}
      ),
      candidates AS (
        SELECT id, true AS from_full FROM full_hits
        UNION ALL SELECT id, false FROM title_hits WHERE id NOT IN (SELECT id FROM full_hits)
      )
      SELECT d.id, d.kind, d.ref_id, ${rank} AS rank, d.title, d.url, d.project_slug, d.project_title, d.category,
             d.severity, d.status, d.tags, d.parts, d.pins, d.updated_at, c.from_full
      FROM candidates c JOIN search_docs d ON d.id = c.id`;
}

export class PostgresSearch implements SearchBackend {
  readonly name = 'postgres' as const;

  constructor(private readonly db: Db) {}

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
    if (first.total.value > 0 && first.total.value < query.pageSize && query.page === 1) return this.widen(query, viewer, first);
    if (first.total.value > 0 || !query.q.trim()) return first;
    // Nothing matched: try the closest known words for likely typos ("atmaga328" → atmega328p).
    const corrected = await this.correct(query.q);
    if (corrected && corrected !== normalizeForSearch(query.q).toLowerCase()) {
      const second = await this.run(query, viewer, corrected);
      if (second.total.value > 0) return { ...second, query: query.q, correctedQuery: corrected };
    }
    return { ...first, suggestions: await this.suggest(query.q) };
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
    const result = await this.db.execute<CandidateRow>(candidateQuery(query, viewer, text));
    const rows = result.rows;
    if (!rows.length) return empty;
    const fullCount = rows.filter((r) => r.from_full).length;
    const capped = fullCount >= CANDIDATES;
    rows.sort((a, b) => b.rank - a.rank || +new Date(b.updated_at) - +new Date(a.updated_at) || b.id - a.id);
    const start = (query.page - 1) * query.pageSize;
    const pageRows = rows.slice(start, start + query.pageSize);
    const labels = await this.facetLabels(rows);
    const highlights = pageRows.length
      ? await this.highlight(
          pageRows.map((r) => r.id),
          text,
        )
      : new Map<number, { title: string; snippet: string }>();
    return {
      ...empty,
      total: { value: rows.length, exact: !capped },
      items: pageRows.map((r) => ({
        kind: r.kind,
        id: r.ref_id,
        title: r.title,
        titleHtml: highlights.get(r.id)?.title ?? escapeHtml(r.title),
        snippetHtml: highlights.get(r.id)?.snippet ?? '',
        url: r.url,
        project: r.project_slug && r.project_title ? { slug: r.project_slug, title: r.project_title } : null,
        category: r.category,
        severity: r.severity,
        status: r.status,
        tags: r.tags,
        parts: r.parts,
        pins: r.pins,
        updatedAt: new Date(r.updated_at).toISOString(),
      })),
      facets: {
        kind: facet(
          rows.map((r) => r.kind),
          (v) => searchKindLabels[v as SearchHit['kind']] ?? v,
        ),
        category: facet(rows.map((r) => r.category), (v) => labels.categories.get(v) ?? v),
        severity: facet(
          rows.map((r) => r.severity),
          (v) => severityLabels[v as Severity]?.split(' —')[0] ?? v,
        ),
        status: facet(
          rows.map((r) => r.status),
          (v) => erratumStatusLabels[v as ErratumStatus] ?? v,
        ),
        tag: facet(rows.flatMap((r) => r.tags), (v) => labels.tags.get(v) ?? v),
        part: facet(rows.flatMap((r) => r.parts)),
        project: facet(
          rows.map((r) => r.project_slug),
          (v) => rows.find((r) => r.project_slug === v)?.project_title ?? v,
        ),
      },
      facetsApproximate: capped,
    };
  }

  /** Display names of the categories and tags the facets list. */
  private async facetLabels(rows: CandidateRow[]): Promise<{ categories: Map<string, string>; tags: Map<string, string> }> {
    const tagSlugs = [...new Set(rows.flatMap((r) => r.tags))];
    const [cats, tagRows] = await Promise.all([
      this.db.execute<{ slug: string; name: string }>(sql`SELECT slug, name FROM categories`),
      tagSlugs.length
        ? this.db.execute<{ slug: string; name: string }>(sql`SELECT slug, name FROM tags WHERE slug IN (SELECT jsonb_array_elements_text(${JSON.stringify(tagSlugs)}::jsonb))`)
        : Promise.resolve({ rows: [] as { slug: string; name: string }[] }),
    ]);
    return { categories: new Map(cats.rows.map((c) => [c.slug, c.name])), tags: new Map(tagRows.rows.map((t) => [t.slug, t.name])) };
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

  private async highlight(ids: number[], text: string): Promise<Map<number, { title: string; snippet: string }>> {
    const tsquery = tsqueryFor(text);
    if (!tsquery) return new Map();
    const options = `StartSel=${MARK_OPEN}, StopSel=${MARK_CLOSE}, MaxWords=30, MinWords=12, MaxFragments=2, FragmentDelimiter=" … "`;
    const rows = await this.db.execute<{ id: number; title: string; snippet: string }>(sql`
      SELECT d.id,
        ts_headline('english', d.title, ${tsquery}, ${`StartSel=${MARK_OPEN}, StopSel=${MARK_CLOSE}, HighlightAll=true`}) AS title,
        ts_headline('english', d.body, ${tsquery}, ${options}) AS snippet
      FROM search_docs d WHERE d.id IN (${sql.join(
        ids.map((id) => sql`${id}`),
        sql`, `,
      )})`);
    return new Map(rows.rows.map((r) => [r.id, { title: markedHtml(r.title), snippet: markedHtml(r.snippet) }]));
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
