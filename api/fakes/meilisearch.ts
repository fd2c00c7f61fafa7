/**
 * A local stand-in for a Meilisearch server, for development and tests. It is a test double,
 * not a search engine: everything lives in memory, every search scans every document, and
 * tasks finish before the request that enqueued them is answered (GET /tasks/:uid then says
 * `succeeded` or `failed`, as a real server would once it got to them).
 *
 * It speaks the subset of the HTTP API that the `meilisearch` SDK (0.62) calls for
 * api/search/meilisearch.ts: indexes, documents (add or replace, partial update, delete by
 * id, by batch, by filter, all), settings (PATCH all, and the per-setting routes), search,
 * tasks, stats, health. `Authorization: Bearer <key>` is required when an API key is set.
 * Requests it does not implement fail loudly (404, or 400 for an unknown search parameter)
 * rather than being silently ignored.
 *
 * Search semantics, close enough to the documented defaults for our contract tests:
 * - tokens: runs of letters and digits, lowercased, accents removed; `.;:!?` and new lines
 *   are hard separators (8 positions apart, so phrases and proximity do not cross them);
 * - query: every word must match (`matchingStrategy: 'all'`; `last` and `frequency` both keep
 *   documents matching a leading run of the words, best first); the last word also matches as
 *   a prefix unless the query ends with a space; `"…"` is a phrase (consecutive words, no
 *   typos); `-word` and `-"…"` exclude; stop words are ignored;
 * - typos: one edit (insertion, deletion, substitution, or swap of neighbours) from
 *   `minWordSizeForTypos.oneTypo` (5) characters, two from `twoTypos` (9); an edit of the first
 *   letter counts twice;
 * - ranking: the `rankingRules` setting, in its order — words (more matched words first),
 *   typo (fewer), proximity (matched words closer together, each gap capped at 8), attribute
 *   (the sum over the matched words of the rank of the best searchable attribute each one is
 *   in), sort (the request's `sort`), exactness (more words matched without typo or prefix),
 *   and `attr:asc|desc` rules; ties keep the order documents were first added in;
 * - filters: `=`, `!=`, `>`, `>=`, `<`, `<=`, `a TO b`, `IN [...]`, `NOT IN [...]`,
 *   `EXISTS`, `IS NULL`, `IS EMPTY` (and their `NOT` forms), `NOT`, `AND`, `OR`, parentheses,
 *   quoted values; strings compare case- and accent-insensitively, booleans as `true`/`false`;
 *   an array attribute matches when one of its values does; the array form of `filter` is an
 *   AND of ORs; only filterable attributes may be used;
 * - facets: counts over every match, `faceting.maxValuesPerFacet` values, sorted by
 *   `sortFacetValuesBy` (alpha by default, or count);
 * - highlighting and cropping: every token of a highlighted attribute that matches a query
 *   word (whole token, also for prefix and typo matches) or belongs to a matched phrase is
 *   wrapped in the tags, in any attribute asked for, searchable or not; a crop is the window of
 *   `cropLength` words holding the most highlighted words, with `cropMarker` where text was cut.
 *
 * Settings kept but not acted on: synonyms, distinct attribute, separator tokens, dictionary,
 * proximity precision and the rest of what GET /settings shows.
 */
import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import express, { type NextFunction, type Request, type Response } from 'express';

type Doc = Record<string, unknown>;

// ─── Text: tokens, query terms, typo tolerance ──────────────────────────────────────────────

export interface Token {
  /** Lowercased, without accents. */
  word: string;
  /** Offsets of the token in the original text. */
  start: number;
  end: number;
  /** Word position, for phrases and proximity; hard separators add 8. */
  position: number;
}

/** Position distance a hard separator (and an array element boundary) adds. */
export const HARD_GAP = 8;

const WORD = /[\p{L}\p{N}]+/gu;
const HARD_SEPARATOR = /[.;:!?\n\r]/;

/** Lowercase and strip accents (NFKD, then drop combining marks). */
export function normalizeWord(raw: string): string {
  return raw
    .normalize('NFKD')
    .replace(/\p{M}+/gu, '')
    .toLowerCase();
}

/** Words of a text with their offsets and positions, starting at `firstPosition`. */
export function tokenize(text: string, firstPosition = 0): Token[] {
  const tokens: Token[] = [];
  let position = firstPosition;
  let lastEnd = -1;
  for (const match of text.matchAll(WORD)) {
    const start = match.index;
    if (lastEnd >= 0) position += HARD_SEPARATOR.test(text.slice(lastEnd, start)) ? HARD_GAP : 1;
    const word = normalizeWord(match[0]);
    if (word) tokens.push({ word, start, end: start + match[0].length, position });
    lastEnd = start + match[0].length;
  }
  return tokens;
}

export interface QueryTerm {
  /** One word, or the words of a phrase. */
  words: string[];
  phrase: boolean;
  negated: boolean;
  /** The last plain word of a query that does not end with a space. */
  prefix: boolean;
}

/**
 * The terms of a query: plain words, `"phrases"` (an unclosed quote runs to the end), and
 * exclusions (`-word`, `-"phrase"`). A chunk such as `SRD-05VDC` gives one plain term per word.
 */
export function parseQuery(q: string): QueryTerm[] {
  const terms: QueryTerm[] = [];
  let i = 0;
  while (i < q.length) {
    if (/\s/.test(q[i]!)) {
      i++;
      continue;
    }
    let negated = false;
    if (q[i] === '-' && i + 1 < q.length && !/\s/.test(q[i + 1]!)) {
      negated = true;
      i++;
    }
    if (q[i] === '"') {
      const close = q.indexOf('"', i + 1);
      const end = close < 0 ? q.length : close;
      const words = tokenize(q.slice(i + 1, end)).map((t) => t.word);
      if (words.length) terms.push({ words, phrase: true, negated, prefix: false });
      i = end + 1;
      continue;
    }
    let end = i;
    while (end < q.length && !/\s/.test(q[end]!)) end++;
    const words = tokenize(q.slice(i, end)).map((t) => t.word);
    if (negated && words.length > 1) terms.push({ words, phrase: true, negated, prefix: false });
    else for (const word of words) terms.push({ words: [word], phrase: false, negated, prefix: false });
    i = end;
  }
  const last = terms.at(-1);
  if (last && !last.phrase && !last.negated && !/\s$/.test(q)) last.prefix = true;
  return terms;
}

export interface TypoSettings {
  enabled: boolean;
  minWordSizeForTypos: { oneTypo: number; twoTypos: number };
  disableOnWords: string[];
  disableOnAttributes: string[];
  disableOnNumbers: boolean;
}

const DEFAULT_TYPOS: TypoSettings = {
  enabled: true,
  minWordSizeForTypos: { oneTypo: 5, twoTypos: 9 },
  disableOnWords: [],
  disableOnAttributes: [],
  disableOnNumbers: false,
};

/** How many typos a query word may carry. */
export function typoBudget(word: string, settings: TypoSettings = DEFAULT_TYPOS): number {
  if (!settings.enabled) return 0;
  if (settings.disableOnWords.some((w) => normalizeWord(w) === word)) return 0;
  if (settings.disableOnNumbers && /^\p{N}+$/u.test(word)) return 0;
  const length = [...word].length;
  if (length >= settings.minWordSizeForTypos.twoTypos) return 2;
  if (length >= settings.minWordSizeForTypos.oneTypo) return 1;
  return 0;
}

/**
 * Edits between a query word and a token (optimal string alignment: insertions, deletions,
 * substitutions and swaps of neighbours). With `prefix`, the best over the token's prefixes.
 */
export function editDistance(query: string, token: string, prefix = false): number {
  const a = [...query];
  const b = [...token];
  const rows: number[][] = [];
  for (let i = 0; i <= a.length; i++) {
    const row: number[] = [i];
    for (let j = 1; j <= b.length; j++) {
      if (i === 0) {
        row.push(j);
        continue;
      }
      const cost = a[i - 1] === b[j - 1] ? 0 : 1;
      let best = Math.min(rows[i - 1]![j]! + 1, row[j - 1]! + 1, rows[i - 1]![j - 1]! + cost);
      if (i > 1 && j > 1 && a[i - 1] === b[j - 2] && a[i - 2] === b[j - 1])
        best = Math.min(best, rows[i - 2]![j - 2]! + 1);
      row.push(best);
    }
    rows.push(row);
  }
  const last = rows[a.length]!;
  return prefix ? Math.min(...last) : last[b.length]!;
}

interface WordMatch {
  typos: number;
  /** The token is the word itself (not a longer word it prefixes, not a typo). */
  exact: boolean;
}

/** Whether a token matches a query word, and how closely. */
export function matchWord(word: string, token: string, prefix: boolean, budget: number): WordMatch | null {
  if (token === word) return { typos: 0, exact: true };
  if (prefix && token.startsWith(word)) return { typos: 0, exact: false };
  if (budget === 0) return null;
  const lengthGap = [...token].length - [...word].length;
  if (!prefix && Math.abs(lengthGap) > budget) return null;
  if (prefix && lengthGap < -budget) return null;
  let typos = editDistance(word, token, prefix);
  // An edit of the first letter counts twice.
  if ([...word][0] !== [...token][0]) typos += 1;
  return typos <= budget ? { typos, exact: false } : null;
}

// ─── Filters ────────────────────────────────────────────────────────────────────────────────

export type FilterNode =
  | { type: 'and' | 'or'; children: FilterNode[] }
  | { type: 'not'; child: FilterNode }
  | { type: 'compare'; attribute: string; op: '=' | '!=' | '>' | '>=' | '<' | '<='; value: string }
  | { type: 'in'; attribute: string; values: string[] }
  | { type: 'range'; attribute: string; from: string; to: string }
  | { type: 'exists' | 'null' | 'empty'; attribute: string };

export class FilterError extends Error {
  override name = 'FilterError';
}

type FilterToken = { kind: 'word' | 'string' | 'op' | 'punct'; text: string; at: number };

function lexFilter(input: string): FilterToken[] {
  const tokens: FilterToken[] = [];
  let i = 0;
  while (i < input.length) {
    const c = input[i]!;
    if (/\s/.test(c)) {
      i++;
    } else if (c === '(' || c === ')' || c === '[' || c === ']' || c === ',') {
      tokens.push({ kind: 'punct', text: c, at: i });
      i++;
    } else if (c === '"' || c === "'") {
      let text = '';
      let j = i + 1;
      for (; j < input.length && input[j] !== c; j++) {
        if (input[j] === '\\' && j + 1 < input.length) j++;
        text += input[j];
      }
      if (j >= input.length)
        throw new FilterError(`Expression \`${input.slice(i)}\` is missing its closing quote ${c}.`);
      tokens.push({ kind: 'string', text, at: i });
      i = j + 1;
    } else if (/[=!<>]/.test(c)) {
      const two = input.slice(i, i + 2);
      const op = ['!=', '>=', '<='].includes(two) ? two : c;
      if (op === '!') throw new FilterError(`Unexpected \`!\` at position ${i}: did you mean \`!=\`?`);
      tokens.push({ kind: 'op', text: op, at: i });
      i += op.length;
    } else {
      let j = i;
      while (j < input.length && !/[\s()[\],"'=!<>]/.test(input[j]!)) j++;
      tokens.push({ kind: 'word', text: input.slice(i, j), at: i });
      i = j;
    }
  }
  return tokens;
}

const OPERATIONS =
  'Was expecting an operation `=`, `!=`, `>=`, `>`, `<=`, `<`, `IN`, `NOT IN`, `TO`, `EXISTS`, `NOT EXISTS`, `IS NULL`, `IS NOT NULL`, `IS EMPTY`, `IS NOT EMPTY`';

/** Parse one filter expression (the string form). Throws FilterError with the reason. */
export function parseFilter(input: string): FilterNode {
  const tokens = lexFilter(input);
  let at = 0;
  const peek = () => tokens[at];
  const isKeyword = (token: FilterToken | undefined, word: string) =>
    token?.kind === 'word' && token.text.toUpperCase() === word;
  const where = (token: FilterToken | undefined) =>
    token ? `at \`${input.slice(token.at)}\`` : 'at the end of the filter';

  function expectValue(): string {
    const token = tokens[at++];
    if (!token || (token.kind !== 'word' && token.kind !== 'string'))
      throw new FilterError(`Was expecting a value ${where(token)}.`);
    return token.text;
  }

  function condition(): FilterNode {
    const name = tokens[at++];
    if (!name || (name.kind !== 'word' && name.kind !== 'string'))
      throw new FilterError(`Was expecting an attribute ${where(name)}.`);
    const attribute = name.text;
    const next = peek();
    if (next?.kind === 'op') {
      at++;
      return { type: 'compare', attribute, op: next.text as '=', value: expectValue() };
    }
    if (isKeyword(next, 'IN')) {
      at++;
      return { type: 'in', attribute, values: list() };
    }
    if (isKeyword(next, 'NOT')) {
      at++;
      if (isKeyword(peek(), 'IN')) {
        at++;
        return { type: 'not', child: { type: 'in', attribute, values: list() } };
      }
      if (isKeyword(peek(), 'EXISTS')) {
        at++;
        return { type: 'not', child: { type: 'exists', attribute } };
      }
      throw new FilterError(`${OPERATIONS} ${where(next)}.`);
    }
    if (isKeyword(next, 'EXISTS')) {
      at++;
      return { type: 'exists', attribute };
    }
    if (isKeyword(next, 'IS')) {
      at++;
      let negate = false;
      if (isKeyword(peek(), 'NOT')) {
        at++;
        negate = true;
      }
      const what = tokens[at++];
      const type = isKeyword(what, 'NULL') ? 'null' : isKeyword(what, 'EMPTY') ? 'empty' : null;
      if (!type) throw new FilterError(`Was expecting NULL or EMPTY ${where(what)}.`);
      const node: FilterNode = { type, attribute };
      return negate ? { type: 'not', child: node } : node;
    }
    if (next && (next.kind === 'word' || next.kind === 'string') && isKeyword(tokens[at + 1], 'TO')) {
      const from = expectValue();
      at++;
      return { type: 'range', attribute, from, to: expectValue() };
    }
    throw new FilterError(`${OPERATIONS} ${where(next)}.`);
  }

  function list(): string[] {
    if (peek()?.text !== '[' || peek()?.kind !== 'punct')
      throw new FilterError(`Was expecting an opening bracket \`[\` ${where(peek())}.`);
    at++;
    const values: string[] = [];
    while (!(peek()?.kind === 'punct' && peek()?.text === ']')) {
      values.push(expectValue());
      if (peek()?.kind === 'punct' && peek()?.text === ',') at++;
      else if (!(peek()?.kind === 'punct' && peek()?.text === ']'))
        throw new FilterError(`Was expecting \`,\` or \`]\` ${where(peek())}.`);
    }
    at++;
    return values;
  }

  function primary(): FilterNode {
    if (isKeyword(peek(), 'NOT')) {
      at++;
      return { type: 'not', child: primary() };
    }
    if (peek()?.kind === 'punct' && peek()?.text === '(') {
      at++;
      const inner = or();
      if (!(peek()?.kind === 'punct' && peek()?.text === ')'))
        throw new FilterError(`Expression is missing the closing \`)\` ${where(peek())}.`);
      at++;
      return inner;
    }
    return condition();
  }

  function and(): FilterNode {
    const children = [primary()];
    while (isKeyword(peek(), 'AND')) {
      at++;
      children.push(primary());
    }
    return children.length === 1 ? children[0]! : { type: 'and', children };
  }

  function or(): FilterNode {
    const children = [and()];
    while (isKeyword(peek(), 'OR')) {
      at++;
      children.push(and());
    }
    return children.length === 1 ? children[0]! : { type: 'or', children };
  }

  if (!tokens.length) throw new FilterError('The filter is empty.');
  const node = or();
  if (at < tokens.length) throw new FilterError(`Found unexpected characters ${where(tokens[at])}.`);
  return node;
}

/** The `filter` search parameter: a string, or an array meaning AND of (string or OR of strings). */
export function filterOf(input: unknown): FilterNode | null {
  if (input === undefined || input === null) return null;
  if (typeof input === 'string') return input.trim() ? parseFilter(input) : null;
  if (!Array.isArray(input))
    throw new FilterError('The filter must be a string or an array of strings and arrays of strings.');
  const children: FilterNode[] = [];
  for (const item of input) {
    if (typeof item === 'string') {
      if (item.trim()) children.push(parseFilter(item));
    } else if (Array.isArray(item) && item.every((s) => typeof s === 'string')) {
      const any = (item as string[]).filter((s) => s.trim()).map(parseFilter);
      if (any.length) children.push(any.length === 1 ? any[0]! : { type: 'or', children: any });
    } else {
      throw new FilterError('The filter must be a string or an array of strings and arrays of strings.');
    }
  }
  return children.length === 0 ? null : children.length === 1 ? children[0]! : { type: 'and', children };
}

/** Every attribute a filter reads. */
export function filterAttributes(node: FilterNode): string[] {
  switch (node.type) {
    case 'and':
    case 'or':
      return node.children.flatMap(filterAttributes);
    case 'not':
      return filterAttributes(node.child);
    default:
      return [node.attribute];
  }
}

function valueAt(doc: Doc, path: string): { present: boolean; value: unknown } {
  if (path in doc) return { present: true, value: doc[path] };
  let current: unknown = doc;
  for (const part of path.split('.')) {
    if (current === null || typeof current !== 'object' || !(part in (current as Doc)))
      return { present: false, value: undefined };
    current = (current as Doc)[part];
  }
  return { present: true, value: current };
}

function scalars(value: unknown): unknown[] {
  return Array.isArray(value) ? value.flatMap(scalars) : [value];
}

function equals(actual: unknown, expected: string): boolean {
  if (actual === null || actual === undefined || typeof actual === 'object') return false;
  if (typeof actual === 'number')
    return Number.isFinite(Number(expected)) && expected.trim() !== '' && actual === Number(expected);
  return normalizeWord(String(actual)) === normalizeWord(expected);
}

function compareNumbers(actual: unknown, op: string, expected: string): boolean {
  const target = Number(expected);
  if (typeof actual !== 'number' || expected.trim() === '' || !Number.isFinite(target)) return false;
  return op === '>'
    ? actual > target
    : op === '>='
      ? actual >= target
      : op === '<'
        ? actual < target
        : actual <= target;
}

/** Whether a document passes a filter. */
export function matchesFilter(node: FilterNode, doc: Doc): boolean {
  switch (node.type) {
    case 'and':
      return node.children.every((child) => matchesFilter(child, doc));
    case 'or':
      return node.children.some((child) => matchesFilter(child, doc));
    case 'not':
      return !matchesFilter(node.child, doc);
    case 'compare': {
      const values = scalars(valueAt(doc, node.attribute).value);
      if (node.op === '=') return values.some((v) => equals(v, node.value));
      if (node.op === '!=') return !values.some((v) => equals(v, node.value));
      return values.some((v) => compareNumbers(v, node.op, node.value));
    }
    case 'in': {
      const values = scalars(valueAt(doc, node.attribute).value);
      return values.some((v) => node.values.some((expected) => equals(v, expected)));
    }
    case 'range': {
      const values = scalars(valueAt(doc, node.attribute).value);
      return values.some((v) => compareNumbers(v, '>=', node.from) && compareNumbers(v, '<=', node.to));
    }
    case 'exists':
      return valueAt(doc, node.attribute).present;
    case 'null':
      return valueAt(doc, node.attribute).present && valueAt(doc, node.attribute).value === null;
    case 'empty': {
      const { present, value } = valueAt(doc, node.attribute);
      if (!present) return false;
      if (value === '' || (Array.isArray(value) && value.length === 0)) return true;
      return value !== null && typeof value === 'object' && !Array.isArray(value) && Object.keys(value).length === 0;
    }
  }
}

// ─── Indexes, settings, tasks ────────────────────────────────────────────────────────────────

const DEFAULT_RANKING_RULES = ['words', 'typo', 'proximity', 'attribute', 'sort', 'exactness'];

function defaultSettings(): Record<string, unknown> {
  return {
    displayedAttributes: ['*'],
    searchableAttributes: ['*'],
    filterableAttributes: [],
    sortableAttributes: [],
    rankingRules: [...DEFAULT_RANKING_RULES],
    stopWords: [],
    nonSeparatorTokens: [],
    separatorTokens: [],
    dictionary: [],
    synonyms: {},
    distinctAttribute: null,
    proximityPrecision: 'byWord',
    typoTolerance: structuredClone(DEFAULT_TYPOS),
    faceting: { maxValuesPerFacet: 100, sortFacetValuesBy: { '*': 'alpha' } },
    pagination: { maxTotalHits: 1000 },
    searchCutoffMs: null,
    localizedAttributes: null,
    facetSearch: true,
    prefixSearch: 'indexingTime',
  };
}

/** URL names of the per-setting routes. */
const SETTING_ROUTES: Record<string, string> = {
  'displayed-attributes': 'displayedAttributes',
  'searchable-attributes': 'searchableAttributes',
  'filterable-attributes': 'filterableAttributes',
  'sortable-attributes': 'sortableAttributes',
  'ranking-rules': 'rankingRules',
  'stop-words': 'stopWords',
  'non-separator-tokens': 'nonSeparatorTokens',
  'separator-tokens': 'separatorTokens',
  dictionary: 'dictionary',
  synonyms: 'synonyms',
  'distinct-attribute': 'distinctAttribute',
  'proximity-precision': 'proximityPrecision',
  'typo-tolerance': 'typoTolerance',
  faceting: 'faceting',
  pagination: 'pagination',
  'search-cutoff-ms': 'searchCutoffMs',
  'localized-attributes': 'localizedAttributes',
  'facet-search': 'facetSearch',
  'prefix-search': 'prefixSearch',
};

const STRING_LISTS = new Set([
  'displayedAttributes',
  'searchableAttributes',
  'sortableAttributes',
  'rankingRules',
  'stopWords',
  'nonSeparatorTokens',
  'separatorTokens',
  'dictionary',
]);
const NESTED = new Set(['typoTolerance', 'faceting', 'pagination']);

interface FakeIndex {
  uid: string;
  primaryKey: string | null;
  createdAt: string;
  updatedAt: string;
  /** By document id, in the order documents were first added (Map keeps it on replace). */
  documents: Map<string, Doc>;
  settings: Record<string, unknown>;
  /** Bumped on every settings change: cached tokens are rebuilt. */
  settingsVersion: number;
}

interface TaskRecord {
  uid: number;
  batchUid: number;
  indexUid: string | null;
  status: 'succeeded' | 'failed';
  type: string;
  canceledBy: null;
  details: Record<string, unknown>;
  error: { message: string; code: string; type: string; link: string } | null;
  duration: string;
  enqueuedAt: string;
  startedAt: string;
  finishedAt: string;
}

/** A task that failed: the task is recorded as failed, the request itself was accepted (202). */
class TaskFailure extends Error {
  constructor(
    readonly code: string,
    message: string,
  ) {
    super(message);
  }
}

/** A request refused outright (non-2xx with the error body). */
class ApiFailure extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly errorType: 'invalid_request' | 'auth' | 'internal' = 'invalid_request',
  ) {
    super(message);
  }
}

const errorBody = (code: string, message: string, type: string) => ({
  message,
  code,
  type,
  link: `https://docs.meilisearch.com/errors#${code}`,
});

const INDEX_UID = /^[A-Za-z0-9_-]{1,400}$/;
const DOCUMENT_ID = /^[A-Za-z0-9_-]{1,511}$/;

function matchesPattern(attribute: string, pattern: string): boolean {
  if (pattern === '*') return true;
  if (pattern.endsWith('*')) return attribute.startsWith(pattern.slice(0, -1));
  return attribute === pattern || attribute.startsWith(`${pattern}.`);
}

/** Filterable attribute patterns: plain names, or the `{ attributePatterns }` form. */
function filterablePatterns(index: FakeIndex): string[] {
  const raw = index.settings.filterableAttributes as Array<string | { attributePatterns?: string[] }>;
  return raw.flatMap((entry) => (typeof entry === 'string' ? [entry] : (entry.attributePatterns ?? [])));
}

function checkFilterable(index: FakeIndex, attributes: string[], code: string, what: string) {
  const patterns = filterablePatterns(index);
  for (const attribute of attributes) {
    if (!patterns.some((p) => matchesPattern(attribute, p))) {
      throw new ApiFailure(
        400,
        code,
        `Index \`${index.uid}\`: Attribute \`${attribute}\` is not ${what}. ${
          patterns.length
            ? `Available ${what} attribute patterns are: \`${patterns.join(', ')}\`.`
            : `This index does not have configured ${what} attributes.`
        }`,
      );
    }
  }
}

// ─── Search ──────────────────────────────────────────────────────────────────────────────────

interface FieldTokens {
  attribute: string;
  rank: number;
  tokens: Token[];
}

interface Occurrence {
  rank: number;
  position: number;
  typos: number;
  exact: boolean;
}

interface Scored {
  doc: Doc;
  order: number;
  words: number;
  typo: number;
  proximity: number;
  attribute: number;
  exactness: number;
}

const SEARCH_PARAMETERS = new Set([
  'q',
  'offset',
  'limit',
  'page',
  'hitsPerPage',
  'filter',
  'facets',
  'sort',
  'attributesToRetrieve',
  'attributesToHighlight',
  'highlightPreTag',
  'highlightPostTag',
  'attributesToCrop',
  'cropLength',
  'cropMarker',
  'matchingStrategy',
  'attributesToSearchOn',
]);

function textsOf(value: unknown): string[] {
  if (typeof value === 'string') return [value];
  if (typeof value === 'number' || typeof value === 'boolean') return [String(value)];
  if (Array.isArray(value)) return value.flatMap(textsOf);
  if (value && typeof value === 'object') return Object.values(value).flatMap(textsOf);
  return [];
}

function searchableFields(index: FakeIndex, doc: Doc, only: string[] | null): FieldTokens[] {
  const configured = index.settings.searchableAttributes as string[];
  const attributes = configured.includes('*') ? Object.keys(doc) : configured;
  const fields: FieldTokens[] = [];
  attributes.forEach((attribute, rank) => {
    if (only && !only.some((p) => matchesPattern(attribute, p))) return;
    const { present, value } = valueAt(doc, attribute);
    if (!present) return;
    const tokens: Token[] = [];
    let position = 0;
    for (const text of textsOf(value)) {
      const found = tokenize(text, position);
      tokens.push(...found);
      position = (found.at(-1)?.position ?? position) + HARD_GAP;
    }
    fields.push({ attribute, rank, tokens });
  });
  return fields;
}

class Matcher {
  private readonly memo = new Map<string, WordMatch | null>();
  constructor(
    readonly word: string,
    readonly prefix: boolean,
    private readonly budget: number,
  ) {}
  match(token: string, typosAllowed = true): WordMatch | null {
    let found = this.memo.get(token);
    if (found === undefined) {
      found = matchWord(this.word, token, this.prefix, this.budget);
      this.memo.set(token, found);
    }
    return found && (typosAllowed || found.typos === 0) ? found : null;
  }
}

function phraseAt(tokens: Token[], i: number, words: string[]): boolean {
  for (let k = 0; k < words.length; k++) {
    const token = tokens[i + k];
    if (!token || token.word !== words[k]) return false;
    if (k > 0 && token.position !== tokens[i + k - 1]!.position + 1) return false;
  }
  return true;
}

interface PreparedTerm {
  term: QueryTerm;
  matcher: Matcher | null;
}

function prepareTerms(index: FakeIndex, q: string): PreparedTerm[] {
  const typos = index.settings.typoTolerance as TypoSettings;
  const stopWords = new Set((index.settings.stopWords as string[]).map(normalizeWord));
  return parseQuery(q)
    .filter((term) => term.phrase || !stopWords.has(term.words[0]!))
    .map((term) => ({
      term,
      matcher: term.phrase
        ? null
        : new Matcher(term.words[0]!, term.prefix, term.negated ? 0 : typoBudget(term.words[0]!, typos)),
    }));
}

function occurrencesOf(prepared: PreparedTerm, fields: FieldTokens[], noTypos: Set<string>): Occurrence[] {
  const found: Occurrence[] = [];
  for (const field of fields) {
    const { tokens } = field;
    for (let i = 0; i < tokens.length; i++) {
      if (prepared.matcher) {
        // An exclusion is the exact word only.
        const m = prepared.term.negated
          ? tokens[i]!.word === prepared.term.words[0]
            ? { typos: 0, exact: true }
            : null
          : prepared.matcher.match(tokens[i]!.word, !noTypos.has(field.attribute));
        if (m) found.push({ rank: field.rank, position: tokens[i]!.position, typos: m.typos, exact: m.exact });
      } else if (phraseAt(tokens, i, prepared.term.words)) {
        found.push({ rank: field.rank, position: tokens[i]!.position, typos: 0, exact: true });
      }
    }
  }
  return found;
}

function proximityBetween(a: Occurrence[], b: Occurrence[]): number {
  let best = HARD_GAP;
  for (const x of a)
    for (const y of b) if (x.rank === y.rank) best = Math.min(best, Math.abs(y.position - x.position) || 1);
  return best;
}

function scoreDocument(
  doc: Doc,
  order: number,
  terms: PreparedTerm[],
  fields: FieldTokens[],
  strategy: string,
  noTypos: Set<string>,
): Scored | null {
  for (const prepared of terms)
    if (prepared.term.negated && occurrencesOf(prepared, fields, noTypos).length) return null;
  const positive = terms.filter((t) => !t.term.negated);
  const matched: Occurrence[][] = [];
  for (const prepared of positive) {
    const found = occurrencesOf(prepared, fields, noTypos);
    if (!found.length) break;
    matched.push(found);
  }
  if (positive.length && matched.length === 0) return null;
  if (strategy === 'all' && matched.length < positive.length) return null;
  let proximity = 0;
  for (let i = 1; i < matched.length; i++) proximity += proximityBetween(matched[i - 1]!, matched[i]!);
  return {
    doc,
    order,
    words: matched.length,
    typo: matched.reduce((sum, found) => sum + Math.min(...found.map((o) => o.typos)), 0),
    proximity,
    attribute: matched.reduce((sum, found) => sum + Math.min(...found.map((o) => o.rank)), 0),
    exactness: matched.filter((found) => found.some((o) => o.exact)).length,
  };
}

function compareValues(a: unknown, b: unknown): number {
  const missingA = a === undefined || a === null;
  const missingB = b === undefined || b === null;
  if (missingA || missingB) return missingA === missingB ? 0 : missingA ? 1 : -1;
  if (typeof a === 'number' && typeof b === 'number') return a - b;
  if (typeof a === 'number') return -1;
  if (typeof b === 'number') return 1;
  return String(a).localeCompare(String(b));
}

function sortRule(spec: string): { attribute: string; direction: 1 | -1 } | null {
  const match = /^(.+):(asc|desc)$/.exec(spec.trim());
  return match ? { attribute: match[1]!, direction: match[2] === 'desc' ? -1 : 1 } : null;
}

function rankingComparator(rules: string[], sort: Array<{ attribute: string; direction: 1 | -1 }>) {
  return (x: Scored, y: Scored): number => {
    for (const rule of rules) {
      let d = 0;
      if (rule === 'words') d = y.words - x.words;
      else if (rule === 'typo') d = x.typo - y.typo;
      else if (rule === 'proximity') d = x.proximity - y.proximity;
      else if (rule === 'attribute') d = x.attribute - y.attribute;
      else if (rule === 'exactness') d = y.exactness - x.exactness;
      else if (rule === 'sort') {
        for (const s of sort) {
          const missing = (v: unknown) => v === undefined || v === null;
          const a = valueAt(x.doc, s.attribute).value;
          const b = valueAt(y.doc, s.attribute).value;
          // Documents without the attribute come last in both directions.
          d = missing(a) || missing(b) ? compareValues(a, b) : s.direction * compareValues(a, b);
          if (d) break;
        }
      } else {
        const custom = sortRule(rule);
        if (custom)
          d =
            custom.direction *
            compareValues(valueAt(x.doc, custom.attribute).value, valueAt(y.doc, custom.attribute).value);
      }
      if (d) return d;
    }
    return x.order - y.order;
  };
}

/** Token indexes of a text to highlight: matches of the query words, and matched phrases. */
function highlightedTokens(tokens: Token[], terms: PreparedTerm[]): Set<number> {
  const marked = new Set<number>();
  for (const prepared of terms) {
    if (prepared.term.negated) continue;
    for (let i = 0; i < tokens.length; i++) {
      if (prepared.matcher) {
        if (prepared.matcher.match(tokens[i]!.word)) marked.add(i);
      } else if (phraseAt(tokens, i, prepared.term.words)) {
        for (let k = 0; k < prepared.term.words.length; k++) marked.add(i + k);
      }
    }
  }
  return marked;
}

interface FormatOptions {
  highlight: boolean;
  crop: number | null;
  pre: string;
  post: string;
  marker: string;
}

function formatText(text: string, terms: PreparedTerm[], options: FormatOptions): string {
  const tokens = tokenize(text);
  const marked = options.highlight || options.crop ? highlightedTokens(tokens, terms) : new Set<number>();
  let first = 0;
  let last = tokens.length - 1;
  let from = 0;
  let to = text.length;
  const cropped = options.crop !== null && tokens.length > options.crop;
  if (cropped) {
    const length = Math.max(1, options.crop!);
    let bestStart = 0;
    let bestCount = -1;
    for (let start = 0; start + length <= tokens.length; start++) {
      let count = 0;
      for (let i = start; i < start + length; i++) if (marked.has(i)) count++;
      if (count > bestCount) {
        bestCount = count;
        bestStart = start;
      }
    }
    // Centre the matches of the best window in it.
    const inWindow = [...marked].filter((i) => i >= bestStart && i < bestStart + length).sort((a, b) => a - b);
    if (inWindow.length) {
      const span = inWindow.at(-1)! - inWindow[0]! + 1;
      bestStart = Math.max(0, Math.min(inWindow[0]! - Math.floor((length - span) / 2), tokens.length - length));
    }
    first = bestStart;
    last = bestStart + length - 1;
    from = tokens[first]!.start;
    to = tokens[last]!.end;
  }
  let out = cropped && first > 0 ? options.marker : '';
  let cursor = from;
  if (options.highlight) {
    for (let i = first; i <= last && i < tokens.length; i++) {
      if (!marked.has(i)) continue;
      const token = tokens[i]!;
      out += text.slice(cursor, token.start) + options.pre + text.slice(token.start, token.end) + options.post;
      cursor = token.end;
    }
  }
  out += text.slice(cursor, to);
  if (cropped && last < tokens.length - 1) out += options.marker;
  return out;
}

/** A value as `_formatted` shows it: strings highlighted and cropped, numbers as strings (as the real server does). */
function formatValue(value: unknown, terms: PreparedTerm[], options: FormatOptions): unknown {
  if (typeof value === 'number') return String(value);
  if (typeof value === 'string')
    return options.highlight || options.crop !== null ? formatText(value, terms, options) : value;
  if (Array.isArray(value)) return value.map((v) => formatValue(v, terms, options));
  if (value && typeof value === 'object')
    return Object.fromEntries(Object.entries(value).map(([k, v]) => [k, formatValue(v, terms, options)]));
  return value;
}

const isStringList = (value: unknown): value is string[] =>
  Array.isArray(value) && value.every((v) => typeof v === 'string');

function nonNegativeInteger(body: Doc, name: string, fallback: number, code: string): number {
  const value = body[name];
  if (value === undefined || value === null) return fallback;
  if (typeof value !== 'number' || !Number.isInteger(value) || value < 0) {
    throw new ApiFailure(
      400,
      code,
      `Invalid value type at \`.${name}\`: expected a positive integer, but found ${JSON.stringify(value)}.`,
    );
  }
  return value;
}

function runSearch(
  index: FakeIndex,
  body: Doc,
  cache: WeakMap<Doc, { version: number; key: string; fields: FieldTokens[] }>,
) {
  const started = Date.now();
  for (const key of Object.keys(body)) {
    if (!SEARCH_PARAMETERS.has(key)) {
      throw new ApiFailure(
        400,
        'bad_request',
        `Unknown field \`${key}\`: the local Meilisearch fake does not implement it (known: ${[...SEARCH_PARAMETERS].join(', ')}).`,
      );
    }
  }
  if (body.q !== undefined && body.q !== null && typeof body.q !== 'string') {
    throw new ApiFailure(
      400,
      'invalid_search_q',
      `Invalid value type at \`.q\`: expected a string, but found ${JSON.stringify(body.q)}.`,
    );
  }
  const q = (body.q as string | null | undefined) ?? '';
  const pageMode = body.page !== undefined || body.hitsPerPage !== undefined;
  const offset = nonNegativeInteger(body, 'offset', 0, 'invalid_search_offset');
  const limit = nonNegativeInteger(body, 'limit', 20, 'invalid_search_limit');
  const page = Math.max(1, nonNegativeInteger(body, 'page', 1, 'invalid_search_page'));
  const hitsPerPage = nonNegativeInteger(body, 'hitsPerPage', 20, 'invalid_search_hits_per_page');
  const strategy = (body.matchingStrategy as string | undefined) ?? 'last';
  if (!['all', 'last', 'frequency'].includes(strategy)) {
    throw new ApiFailure(
      400,
      'invalid_search_matching_strategy',
      `Unknown value \`${strategy}\` at \`.matchingStrategy\`: expected one of \`last\`, \`all\`, \`frequency\`.`,
    );
  }
  for (const name of [
    'attributesToRetrieve',
    'attributesToHighlight',
    'attributesToCrop',
    'facets',
    'sort',
    'attributesToSearchOn',
  ] as const) {
    if (body[name] !== undefined && body[name] !== null && !isStringList(body[name])) {
      const code = `invalid_search_${name.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`)}`;
      throw new ApiFailure(400, code, `Invalid value type at \`.${name}\`: expected an array of strings.`);
    }
  }

  let filter: FilterNode | null;
  try {
    filter = filterOf(body.filter);
  } catch (error) {
    if (error instanceof FilterError) throw new ApiFailure(400, 'invalid_search_filter', error.message);
    throw error;
  }
  if (filter) checkFilterable(index, filterAttributes(filter), 'invalid_search_filter', 'filterable');
  const facetNames = (body.facets as string[] | undefined) ?? null;
  const facets = facetNames?.includes('*') ? filterablePatterns(index).filter((p) => !p.includes('*')) : facetNames;
  if (facets) checkFilterable(index, facets, 'invalid_search_facets', 'filterable');

  const rules = index.settings.rankingRules as string[];
  const sort = ((body.sort as string[] | undefined) ?? []).map((spec) => {
    const parsed = sortRule(spec);
    if (!parsed)
      throw new ApiFailure(
        400,
        'invalid_search_sort',
        `Invalid syntax for the sort parameter: expected \`field:asc\` or \`field:desc\`, found \`${spec}\`.`,
      );
    return parsed;
  });
  if (sort.length) {
    if (!rules.includes('sort')) {
      throw new ApiFailure(
        400,
        'invalid_search_sort',
        'The sort ranking rule must be specified in the ranking rules settings to use the sort parameter at search time.',
      );
    }
    const sortable = index.settings.sortableAttributes as string[];
    for (const s of sort) {
      if (!sortable.some((p) => matchesPattern(s.attribute, p))) {
        throw new ApiFailure(
          400,
          'invalid_search_sort',
          `Index \`${index.uid}\`: Attribute \`${s.attribute}\` is not sortable. Available sortable attributes are: \`${sortable.join(', ')}\`.`,
        );
      }
    }
  }

  const only = (body.attributesToSearchOn as string[] | undefined) ?? null;
  const typoSettings = index.settings.typoTolerance as TypoSettings;
  const noTypos = new Set(typoSettings.disableOnAttributes);
  const terms = prepareTerms(index, q);
  const cacheKey = JSON.stringify(only);
  const matches: Scored[] = [];
  let order = 0;
  for (const doc of index.documents.values()) {
    order++;
    if (filter && !matchesFilter(filter, doc)) continue;
    let cached = cache.get(doc);
    if (!cached || cached.version !== index.settingsVersion || cached.key !== cacheKey) {
      cached = { version: index.settingsVersion, key: cacheKey, fields: searchableFields(index, doc, only) };
      cache.set(doc, cached);
    }
    const scored = scoreDocument(doc, order, terms, cached.fields, strategy, noTypos);
    if (scored) matches.push(scored);
  }
  matches.sort(rankingComparator(rules, sort));

  const maxTotalHits = (index.settings.pagination as { maxTotalHits: number }).maxTotalHits;
  const reachable = matches.slice(0, maxTotalHits);
  const from = pageMode ? (page - 1) * hitsPerPage : offset;
  const count = pageMode ? hitsPerPage : limit;
  const pageHits = reachable.slice(from, from + count);

  const displayed = index.settings.displayedAttributes as string[];
  const retrieve = (body.attributesToRetrieve as string[] | undefined) ?? ['*'];
  const shown = (attribute: string) =>
    displayed.some((p) => matchesPattern(attribute, p)) && retrieve.some((p) => matchesPattern(attribute, p));
  const toHighlight = (body.attributesToHighlight as string[] | undefined) ?? [];
  const cropSpecs = ((body.attributesToCrop as string[] | undefined) ?? []).map((spec) => {
    const [attribute, length] = spec.split(':');
    return { attribute: attribute!, length: length ? Number(length) : null };
  });
  const defaultCrop = nonNegativeInteger(body, 'cropLength', 10, 'invalid_search_crop_length');
  const formatting = toHighlight.length > 0 || cropSpecs.length > 0;
  const pre = typeof body.highlightPreTag === 'string' ? body.highlightPreTag : '<em>';
  const post = typeof body.highlightPostTag === 'string' ? body.highlightPostTag : '</em>';
  const marker = typeof body.cropMarker === 'string' ? body.cropMarker : '…';

  const hits = pageHits.map(({ doc }) => {
    const hit: Doc = {};
    for (const [key, value] of Object.entries(doc)) if (shown(key)) hit[key] = value;
    if (formatting) {
      const formatted: Doc = {};
      for (const [key, value] of Object.entries(hit)) {
        const highlight = toHighlight.some((p) => matchesPattern(key, p));
        const crop = cropSpecs.find((c) => matchesPattern(key, c.attribute));
        const options: FormatOptions = {
          highlight,
          crop: crop ? (crop.length ?? defaultCrop) : null,
          pre,
          post,
          marker,
        };
        formatted[key] = formatValue(value, terms, options);
      }
      hit._formatted = formatted;
    }
    return hit;
  });

  const response: Doc = { hits, query: q, processingTimeMs: Date.now() - started };
  if (pageMode) {
    Object.assign(response, {
      hitsPerPage,
      page,
      totalPages: hitsPerPage ? Math.ceil(reachable.length / hitsPerPage) : 0,
      totalHits: reachable.length,
    });
  } else {
    Object.assign(response, { limit, offset, estimatedTotalHits: reachable.length });
  }
  if (facets) {
    const faceting = index.settings.faceting as {
      maxValuesPerFacet: number;
      sortFacetValuesBy: Record<string, 'alpha' | 'count'>;
    };
    const distribution: Record<string, Record<string, number>> = {};
    for (const name of facets) {
      const counts = new Map<string, { value: string; count: number }>();
      for (const { doc } of matches) {
        const seen = new Set<string>();
        for (const v of scalars(valueAt(doc, name).value)) {
          if (v === null || v === undefined || typeof v === 'object') continue;
          const value = String(v);
          const key = normalizeWord(value);
          if (seen.has(key)) continue;
          seen.add(key);
          const entry = counts.get(key) ?? { value, count: 0 };
          entry.count++;
          counts.set(key, entry);
        }
      }
      const sortBy = faceting.sortFacetValuesBy[name] ?? faceting.sortFacetValuesBy['*'] ?? 'alpha';
      const entries = [...counts.values()].sort(
        (a, b) => (sortBy === 'count' ? b.count - a.count : 0) || a.value.localeCompare(b.value),
      );
      distribution[name] = Object.fromEntries(
        entries.slice(0, faceting.maxValuesPerFacet).map((e) => [e.value, e.count]),
      );
    }
    response.facetDistribution = distribution;
    response.facetStats = {};
  }
  return response;
}

// ─── HTTP ──────────────────────────────────────────────────────────────────────────────────────

export interface FakeMeilisearchOptions {
  /** When set, every route but /health needs `Authorization: Bearer <apiKey>`. */
  apiKey?: string;
}

export interface RunningFakeMeilisearch {
  /** `http://127.0.0.1:<port>` — what the SDK's `host` should be. */
  url: string;
  close(): Promise<void>;
  /** Drop every index and task. */
  reset(): void;
}

export function createFakeMeilisearch(options: FakeMeilisearchOptions = {}) {
  const indexes = new Map<string, FakeIndex>();
  const tasks = new Map<number, TaskRecord>();
  let nextTaskUid = 0;
  const tokenCache = new WeakMap<Doc, { version: number; key: string; fields: FieldTokens[] }>();

  const now = () => new Date().toISOString();

  function newIndex(uid: string, primaryKey: string | null): FakeIndex {
    const at = now();
    const index: FakeIndex = {
      uid,
      primaryKey,
      createdAt: at,
      updatedAt: at,
      documents: new Map(),
      settings: defaultSettings(),
      settingsVersion: 0,
    };
    indexes.set(uid, index);
    return index;
  }

  function existing(uid: string): FakeIndex {
    const index = indexes.get(uid);
    if (!index) throw new ApiFailure(404, 'index_not_found', `Index \`${uid}\` not found.`);
    return index;
  }

  /** Run a write at once and record it as a finished task. */
  function enqueue(
    res: Response,
    indexUid: string | null,
    type: string,
    details: Record<string, unknown>,
    work: () => Record<string, unknown> | void,
  ) {
    const uid = nextTaskUid++;
    const enqueuedAt = now();
    const record: TaskRecord = {
      uid,
      batchUid: uid,
      indexUid,
      status: 'succeeded',
      type,
      canceledBy: null,
      details,
      error: null,
      duration: 'PT0S',
      enqueuedAt,
      startedAt: enqueuedAt,
      finishedAt: enqueuedAt,
    };
    try {
      Object.assign(details, work() ?? {});
    } catch (error) {
      if (!(error instanceof TaskFailure)) throw error;
      record.status = 'failed';
      record.error = errorBody(error.code, error.message, 'invalid_request');
    }
    record.finishedAt = now();
    tasks.set(uid, record);
    res.status(202).json({ taskUid: uid, indexUid, status: 'enqueued', type, enqueuedAt });
  }

  function indexForWrite(uid: string): FakeIndex {
    if (!INDEX_UID.test(uid)) throw new TaskFailure('invalid_index_uid', `\`${uid}\` is not a valid index uid.`);
    // Like the real server, adding documents or settings creates a missing index.
    return indexes.get(uid) ?? newIndex(uid, null);
  }

  function primaryKeyFor(index: FakeIndex, docs: Doc[], requested: unknown): string {
    if (typeof requested === 'string' && requested) {
      if (index.primaryKey && index.primaryKey !== requested) {
        throw new TaskFailure(
          'index_primary_key_already_exists',
          `Index \`${index.uid}\`: Index already has a primary key: \`${index.primaryKey}\`.`,
        );
      }
      return requested;
    }
    if (index.primaryKey) return index.primaryKey;
    const candidates = [...new Set(docs.flatMap((d) => Object.keys(d)).filter((k) => /id$/i.test(k)))];
    if (candidates.length === 1) return candidates[0]!;
    throw new TaskFailure(
      candidates.length ? 'index_primary_key_multiple_candidates_found' : 'index_primary_key_no_candidate_found',
      `Index \`${index.uid}\`: The primary key inference failed as the engine ${candidates.length ? `found ${candidates.length} fields ending with \`id\` in their names` : 'did not find any field ending with `id` in its name'}. Please specify the primary key manually using the \`primaryKey\` query parameter.`,
    );
  }

  function documentId(index: FakeIndex, doc: Doc, key: string): string {
    const id = doc[key];
    if (id === undefined || id === null)
      throw new TaskFailure(
        'missing_document_id',
        `Index \`${index.uid}\`: Document doesn't have a \`${key}\` attribute: \`${JSON.stringify(doc)}\`.`,
      );
    const text = typeof id === 'number' && Number.isInteger(id) ? String(id) : typeof id === 'string' ? id : null;
    if (text === null || !DOCUMENT_ID.test(text)) {
      throw new TaskFailure(
        'invalid_document_id',
        `Index \`${index.uid}\`: Document identifier \`${JSON.stringify(id)}\` is invalid. A document identifier can be of type integer or string, only composed of alphanumeric characters (a-z A-Z 0-9), hyphens (-) and underscores (_), and can not be more than 511 bytes.`,
      );
    }
    return text;
  }

  function writeDocuments(req: Request, res: Response, mode: 'replace' | 'update') {
    const uid = req.params.uid as string;
    const body: unknown = req.body;
    const docs = (Array.isArray(body) ? body : [body]) as unknown[];
    if (body === undefined || !docs.every((d) => d !== null && typeof d === 'object' && !Array.isArray(d))) {
      throw new ApiFailure(400, 'malformed_payload', 'The payload must be a JSON object or an array of objects.');
    }
    enqueue(res, uid, 'documentAdditionOrUpdate', { receivedDocuments: docs.length, indexedDocuments: 0 }, () => {
      const index = indexForWrite(uid);
      const key = primaryKeyFor(index, docs as Doc[], req.query.primaryKey);
      // Validate the whole batch first: a failed task changes nothing.
      const keyed = (docs as Doc[]).map((doc) => [documentId(index, doc, key), doc] as const);
      index.primaryKey = key;
      for (const [id, doc] of keyed) {
        const before = index.documents.get(id);
        index.documents.set(
          id,
          mode === 'update' && before ? { ...before, ...structuredClone(doc) } : structuredClone(doc),
        );
      }
      index.updatedAt = now();
      return { indexedDocuments: keyed.length };
    });
  }

  function applySettings(index: FakeIndex, patch: Record<string, unknown>) {
    const next = { ...index.settings };
    const defaults = defaultSettings();
    for (const [name, value] of Object.entries(patch)) {
      if (!(name in defaults)) throw new TaskFailure('bad_request', `Unknown setting \`${name}\`.`);
      if (value === null) next[name] = defaults[name];
      else if (STRING_LISTS.has(name) && !isStringList(value))
        throw new TaskFailure(`invalid_settings_${snake(name)}`, `\`${name}\` must be an array of strings.`);
      else if (NESTED.has(name)) {
        if (typeof value !== 'object' || Array.isArray(value))
          throw new TaskFailure(`invalid_settings_${snake(name)}`, `\`${name}\` must be an object.`);
        const merged: Record<string, unknown> = { ...(next[name] as object) };
        for (const [k, v] of Object.entries(value as object)) {
          const fallback = (defaults[name] as Record<string, unknown>)[k];
          merged[k] =
            v === null
              ? fallback
              : v && typeof v === 'object' && !Array.isArray(v) && fallback && typeof fallback === 'object'
                ? { ...(fallback as object), ...(merged[k] as object), ...v }
                : v;
        }
        next[name] = merged;
      } else next[name] = structuredClone(value);
    }
    index.settings = next;
    index.settingsVersion++;
    index.updatedAt = now();
  }

  const snake = (name: string) => name.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`);

  const app = express();
  app.disable('x-powered-by');
  app.disable('etag');

  app.get('/health', (_req, res) => {
    res.json({ status: 'available' });
  });

  app.use((req, _res, next) => {
    if (!options.apiKey) return next();
    const header = req.get('authorization');
    if (!header)
      throw new ApiFailure(
        401,
        'missing_authorization_header',
        'The Authorization header is missing. It must use the bearer authorization method.',
        'auth',
      );
    if (header !== `Bearer ${options.apiKey}`)
      throw new ApiFailure(403, 'invalid_api_key', 'The provided API key is invalid.', 'auth');
    next();
  });
  app.use(express.json({ limit: '100mb', strict: false, type: () => true }));

  app.get('/version', (_req, res) => {
    res.json({ commitSha: 'local-fake', commitDate: '1970-01-01T00:00:00Z', pkgVersion: '1.0.0-fake' });
  });

  const indexObject = (index: FakeIndex) => ({
    uid: index.uid,
    primaryKey: index.primaryKey,
    createdAt: index.createdAt,
    updatedAt: index.updatedAt,
  });

  app.get('/indexes', (req, res) => {
    const offset = Number(req.query.offset ?? 0);
    const limit = Number(req.query.limit ?? 20);
    const all = [...indexes.values()].sort((a, b) => a.uid.localeCompare(b.uid));
    res.json({ results: all.slice(offset, offset + limit).map(indexObject), offset, limit, total: all.length });
  });

  app.post('/indexes', (req, res) => {
    const body = (req.body ?? {}) as { uid?: unknown; primaryKey?: unknown };
    if (typeof body.uid !== 'string') throw new ApiFailure(400, 'missing_index_uid', 'Missing field `uid`.');
    if (!INDEX_UID.test(body.uid))
      throw new ApiFailure(400, 'invalid_index_uid', `\`${body.uid}\` is not a valid index uid.`);
    const uid = body.uid;
    enqueue(res, uid, 'indexCreation', { primaryKey: body.primaryKey ?? null }, () => {
      if (indexes.has(uid)) throw new TaskFailure('index_already_exists', `Index \`${uid}\` already exists.`);
      newIndex(uid, typeof body.primaryKey === 'string' ? body.primaryKey : null);
    });
  });

  app.get('/indexes/:uid', (req, res) => {
    res.json(indexObject(existing(req.params.uid)));
  });

  app.patch('/indexes/:uid', (req, res) => {
    const uid = req.params.uid;
    const body = (req.body ?? {}) as { primaryKey?: unknown };
    enqueue(res, uid, 'indexUpdate', { primaryKey: body.primaryKey ?? null }, () => {
      const index = indexes.get(uid);
      if (!index) throw new TaskFailure('index_not_found', `Index \`${uid}\` not found.`);
      if (typeof body.primaryKey === 'string') {
        if (index.documents.size && index.primaryKey !== body.primaryKey) {
          throw new TaskFailure(
            'index_primary_key_already_exists',
            `Index \`${uid}\`: Index already has a primary key: \`${index.primaryKey}\`.`,
          );
        }
        index.primaryKey = body.primaryKey;
      }
      index.updatedAt = now();
    });
  });

  app.delete('/indexes/:uid', (req, res) => {
    const uid = req.params.uid;
    enqueue(res, uid, 'indexDeletion', { deletedDocuments: 0 }, () => {
      const index = indexes.get(uid);
      if (!index) throw new TaskFailure('index_not_found', `Index \`${uid}\` not found.`);
      indexes.delete(uid);
      return { deletedDocuments: index.documents.size };
    });
  });

  app.get('/indexes/:uid/stats', (req, res) => {
    const index = existing(req.params.uid);
    const fieldDistribution: Record<string, number> = {};
    for (const doc of index.documents.values())
      for (const key of Object.keys(doc)) fieldDistribution[key] = (fieldDistribution[key] ?? 0) + 1;
    res.json({ numberOfDocuments: index.documents.size, isIndexing: false, fieldDistribution });
  });

  app.get('/indexes/:uid/documents', (req, res) => {
    const index = existing(req.params.uid);
    const offset = Number(req.query.offset ?? 0);
    const limit = Number(req.query.limit ?? 20);
    const all = [...index.documents.values()];
    res.json({ results: all.slice(offset, offset + limit), offset, limit, total: all.length });
  });

  app.get('/indexes/:uid/documents/:id', (req, res) => {
    const index = existing(req.params.uid);
    const doc = index.documents.get(req.params.id);
    if (!doc) throw new ApiFailure(404, 'document_not_found', `Document \`${req.params.id}\` not found.`);
    res.json(doc);
  });

  app.post('/indexes/:uid/documents/delete-batch', (req, res) => {
    const uid = req.params.uid;
    const ids: unknown = req.body;
    if (!Array.isArray(ids) || !ids.every((id) => typeof id === 'string' || typeof id === 'number')) {
      throw new ApiFailure(400, 'invalid_document_ids', 'The payload must be an array of document ids.');
    }
    enqueue(res, uid, 'documentDeletion', { providedIds: ids.length, deletedDocuments: 0 }, () => {
      const index = indexes.get(uid);
      if (!index) throw new TaskFailure('index_not_found', `Index \`${uid}\` not found.`);
      let deleted = 0;
      for (const id of ids) if (index.documents.delete(String(id))) deleted++;
      index.updatedAt = now();
      return { deletedDocuments: deleted };
    });
  });

  app.post('/indexes/:uid/documents/delete', (req, res) => {
    const uid = req.params.uid;
    const index = existing(uid);
    let filter: FilterNode | null;
    try {
      filter = filterOf((req.body as { filter?: unknown } | undefined)?.filter);
    } catch (error) {
      if (error instanceof FilterError) throw new ApiFailure(400, 'invalid_document_filter', error.message);
      throw error;
    }
    if (!filter) throw new ApiFailure(400, 'missing_document_filter', 'Missing field `filter`.');
    checkFilterable(index, filterAttributes(filter), 'invalid_document_filter', 'filterable');
    const node = filter;
    enqueue(
      res,
      uid,
      'documentDeletion',
      { originalFilter: JSON.stringify((req.body as { filter: unknown }).filter), deletedDocuments: 0 },
      () => {
        let deleted = 0;
        for (const [id, doc] of index.documents) {
          if (matchesFilter(node, doc)) {
            index.documents.delete(id);
            deleted++;
          }
        }
        return { deletedDocuments: deleted };
      },
    );
  });

  app.post('/indexes/:uid/documents', (req, res) => writeDocuments(req, res, 'replace'));
  app.put('/indexes/:uid/documents', (req, res) => writeDocuments(req, res, 'update'));

  app.delete('/indexes/:uid/documents/:id', (req, res) => {
    const { uid, id } = req.params;
    enqueue(res, uid, 'documentDeletion', { providedIds: 1, deletedDocuments: 0 }, () => {
      const index = indexes.get(uid);
      if (!index) throw new TaskFailure('index_not_found', `Index \`${uid}\` not found.`);
      return { deletedDocuments: index.documents.delete(id) ? 1 : 0 };
    });
  });

  app.delete('/indexes/:uid/documents', (req, res) => {
    const uid = req.params.uid;
    enqueue(res, uid, 'documentDeletion', { providedIds: 0, deletedDocuments: 0 }, () => {
      const index = indexes.get(uid);
      if (!index) throw new TaskFailure('index_not_found', `Index \`${uid}\` not found.`);
      const deleted = index.documents.size;
      index.documents.clear();
      return { deletedDocuments: deleted };
    });
  });

  app.get('/indexes/:uid/settings', (req, res) => {
    res.json(existing(req.params.uid).settings);
  });

  app.patch('/indexes/:uid/settings', (req, res) => {
    const uid = req.params.uid;
    const patch = req.body as unknown;
    if (!patch || typeof patch !== 'object' || Array.isArray(patch))
      throw new ApiFailure(400, 'bad_request', 'The settings must be a JSON object.');
    enqueue(res, uid, 'settingsUpdate', { ...(patch as object) }, () =>
      applySettings(indexForWrite(uid), patch as Record<string, unknown>),
    );
  });

  app.delete('/indexes/:uid/settings', (req, res) => {
    const uid = req.params.uid;
    enqueue(res, uid, 'settingsUpdate', {}, () => {
      const index = indexes.get(uid);
      if (!index) throw new TaskFailure('index_not_found', `Index \`${uid}\` not found.`);
      index.settings = defaultSettings();
      index.settingsVersion++;
    });
  });

  app.get('/indexes/:uid/settings/:setting', (req, res) => {
    const name = SETTING_ROUTES[req.params.setting];
    if (!name)
      throw new ApiFailure(404, 'not_found', `The local Meilisearch fake has no setting \`${req.params.setting}\`.`);
    res.json(existing(req.params.uid).settings[name]);
  });

  const putSetting = (req: Request, res: Response) => {
    const uid = req.params.uid as string;
    const name = SETTING_ROUTES[req.params.setting as string];
    if (!name)
      throw new ApiFailure(
        404,
        'not_found',
        `The local Meilisearch fake has no setting \`${String(req.params.setting)}\`.`,
      );
    const value: unknown = req.body ?? null;
    enqueue(res, uid, 'settingsUpdate', { [name]: value }, () => applySettings(indexForWrite(uid), { [name]: value }));
  };
  app.put('/indexes/:uid/settings/:setting', putSetting);
  app.patch('/indexes/:uid/settings/:setting', putSetting);
  app.delete('/indexes/:uid/settings/:setting', (req, res) => {
    const uid = req.params.uid;
    const name = SETTING_ROUTES[req.params.setting];
    if (!name)
      throw new ApiFailure(404, 'not_found', `The local Meilisearch fake has no setting \`${req.params.setting}\`.`);
    enqueue(res, uid, 'settingsUpdate', { [name]: null }, () => {
      const index = indexes.get(uid);
      if (!index) throw new TaskFailure('index_not_found', `Index \`${uid}\` not found.`);
      applySettings(index, { [name]: null });
    });
  });

  app.post('/indexes/:uid/search', (req, res) => {
    const body = (req.body ?? {}) as unknown;
    if (typeof body !== 'object' || body === null || Array.isArray(body))
      throw new ApiFailure(400, 'bad_request', 'The search parameters must be a JSON object.');
    res.json(runSearch(existing(req.params.uid), body as Doc, tokenCache));
  });

  app.get('/tasks/:uid', (req, res) => {
    const task = tasks.get(Number(req.params.uid));
    if (!task) throw new ApiFailure(404, 'task_not_found', `Task \`${req.params.uid}\` not found.`);
    res.json(task);
  });

  app.use((req: Request) => {
    throw new ApiFailure(404, 'not_found', `The local Meilisearch fake does not implement ${req.method} ${req.path}.`);
  });

  app.use((error: unknown, _req: Request, res: Response, _next: NextFunction) => {
    if (error instanceof ApiFailure) {
      res.status(error.status).json(errorBody(error.code, error.message, error.errorType));
      return;
    }
    const parserError = error as { type?: string; status?: number; message?: string };
    if (parserError.type === 'entity.parse.failed') {
      res
        .status(400)
        .json(
          errorBody(
            'malformed_payload',
            `The JSON payload is malformed: ${parserError.message ?? ''}`,
            'invalid_request',
          ),
        );
      return;
    }
    if (parserError.type === 'entity.too.large') {
      res
        .status(413)
        .json(errorBody('payload_too_large', 'The provided payload reached the size limit.', 'invalid_request'));
      return;
    }
    res.status(500).json(errorBody('internal', (error as Error).message ?? 'internal error', 'internal'));
  });

  return {
    app,
    reset() {
      indexes.clear();
      tasks.clear();
      nextTaskUid = 0;
    },
  };
}

export async function startFakeMeilisearch(
  options: FakeMeilisearchOptions & { port?: number; host?: string } = {},
): Promise<RunningFakeMeilisearch> {
  const { app, reset } = createFakeMeilisearch(options);
  const host = options.host ?? '127.0.0.1';
  const server = await new Promise<Server>((resolve, reject) => {
    const s = app.listen(options.port ?? 0, host, () => resolve(s));
    s.once('error', reject);
  });
  const { port } = server.address() as AddressInfo;
  return {
    url: `http://${host.includes(':') ? `[${host}]` : host}:${port}`,
    reset,
    close: () =>
      new Promise<void>((resolve) => {
        server.close(() => resolve());
        server.closeAllConnections();
      }),
  };
}
