/**
 * What the errata table shows, as pure functions: which errata pass the reader's filters, in
 * which order, what the status counts and the "applies to my board" answers say, and how the
 * filters travel in the URL so a view can be shared. A project has tens of errata, not
 * thousands, so all of this runs in the browser on the full list the API sends.
 */
import type { Erratum } from '@shared/contracts/errata';
import { erratumStatuses, severities, type ErratumStatus, type Severity } from '@shared/domain';
import type { LocationQuery, LocationQueryValue } from 'vue-router';

export interface BoardRef {
  id: number;
  label: string;
}

export const errataSortKeys = [
  'number',
  'title',
  'severity',
  'status',
  'affected',
  'category',
  'workaround',
  'updated',
] as const;
export type ErrataSortKey = (typeof errataSortKeys)[number];
export type SortOrder = 'asc' | 'desc';

export interface ErrataSort {
  key: ErrataSortKey;
  order: SortOrder;
}

export interface ErrataFilters {
  /** "Applies to my board": the board revision the reader holds, by id. */
  myBoard: number | null;
  /** Errata affecting any of these board revisions (ids). */
  boards: number[];
  statuses: ErratumStatus[];
  severities: Severity[];
  /** Category slugs. */
  categories: string[];
  /** Words to find in the title, symptom, cause, reference designators, parts and pins. */
  text: string;
  sort: ErrataSort;
}

export const DEFAULT_SORT: Readonly<ErrataSort> = Object.freeze({ key: 'number', order: 'asc' });

export function emptyFilters(): ErrataFilters {
  return {
    myBoard: null,
    boards: [],
    statuses: [],
    severities: [],
    categories: [],
    text: '',
    sort: { ...DEFAULT_SORT },
  };
}

/** Whether any filter narrows the list (the sort does not count). */
export function isFiltered(filters: ErrataFilters): boolean {
  return (
    filters.myBoard !== null ||
    filters.boards.length > 0 ||
    filters.statuses.length > 0 ||
    filters.severities.length > 0 ||
    filters.categories.length > 0 ||
    filters.text.trim() !== ''
  );
}

// --- Facts about one erratum ----------------------------------------------------------------------

/** A workaround exists when one is written down or the status says so. */
export function hasWorkaround(erratum: Pick<Erratum, 'workaround' | 'status'>): boolean {
  return erratum.status === 'workaround' || erratum.workaround.trim() !== '';
}

export function affects(erratum: Pick<Erratum, 'affected'>, boardId: number): boolean {
  return erratum.affected.some((board) => board.id === boardId);
}

function normalise(text: string): string {
  return text
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase();
}

/** Every word of `text` must appear somewhere in the erratum's searchable fields. */
export function matchesText(erratum: Erratum, text: string): boolean {
  const words = normalise(text).split(/\s+/).filter(Boolean);
  if (words.length === 0) return true;
  const haystack = normalise(
    [
      erratum.code,
      erratum.title,
      erratum.symptom,
      erratum.cause,
      erratum.refdes.join(' '),
      erratum.parts.join(' '),
      erratum.pins.join(' '),
    ].join('\n'),
  );
  return words.every((word) => haystack.includes(word));
}

// --- Filtering and sorting ------------------------------------------------------------------------

export type FilterPart = 'myBoard' | 'boards' | 'statuses' | 'severities' | 'categories' | 'text';

/** The errata passing every filter except those named in `ignore`. */
export function filterErrata(
  items: readonly Erratum[],
  filters: ErrataFilters,
  ignore: readonly FilterPart[] = [],
): Erratum[] {
  const use = (part: FilterPart) => !ignore.includes(part);
  return items.filter((erratum) => {
    if (use('myBoard') && filters.myBoard !== null && !affects(erratum, filters.myBoard)) return false;
    if (use('boards') && filters.boards.length > 0 && !filters.boards.some((id) => affects(erratum, id))) return false;
    if (use('statuses') && filters.statuses.length > 0 && !filters.statuses.includes(erratum.status)) return false;
    if (use('severities') && filters.severities.length > 0 && !filters.severities.includes(erratum.severity)) {
      return false;
    }
    if (use('categories') && filters.categories.length > 0 && !filters.categories.includes(erratum.category.slug)) {
      return false;
    }
    if (use('text') && !matchesText(erratum, filters.text)) return false;
    return true;
  });
}

const severityRank = new Map<Severity, number>(severities.map((s, i) => [s, i]));
const statusRank = new Map<ErratumStatus, number>(erratumStatuses.map((s, i) => [s, i]));
const collator = new Intl.Collator('en', { numeric: true, sensitivity: 'base' });

/**
 * Orders errata by `sort`; ties fall back to the erratum number, so the order is stable and the
 * same in the table and the phone cards. Severity runs cosmetic → critical (descending puts
 * critical first); status runs open → won't fix; affected revisions by the earliest board the
 * erratum affects, in the project's board order.
 */
export function sortErrata(items: readonly Erratum[], sort: ErrataSort, boards: readonly BoardRef[]): Erratum[] {
  const boardRank = new Map(boards.map((b, i) => [b.id, i]));
  const firstBoard = (e: Erratum) =>
    Math.min(...e.affected.map((b) => boardRank.get(b.id) ?? Number.MAX_SAFE_INTEGER), Number.MAX_SAFE_INTEGER);
  const compare = (a: Erratum, b: Erratum): number => {
    switch (sort.key) {
      case 'number':
        return a.number - b.number;
      case 'title':
        return collator.compare(a.title, b.title);
      case 'severity':
        return severityRank.get(a.severity)! - severityRank.get(b.severity)!;
      case 'status':
        return statusRank.get(a.status)! - statusRank.get(b.status)!;
      case 'affected':
        return firstBoard(a) - firstBoard(b);
      case 'category':
        return collator.compare(a.category.name, b.category.name);
      case 'workaround':
        return Number(hasWorkaround(a)) - Number(hasWorkaround(b));
      case 'updated':
        return a.updatedAt < b.updatedAt ? -1 : a.updatedAt > b.updatedAt ? 1 : 0;
    }
  };
  const direction = sort.order === 'desc' ? -1 : 1;
  return [...items].sort((a, b) => direction * compare(a, b) || a.number - b.number);
}

/** The rows of the table: filtered, then sorted. */
export function selectErrata(
  items: readonly Erratum[],
  filters: ErrataFilters,
  boards: readonly BoardRef[],
): Erratum[] {
  return sortErrata(filterErrata(items, filters), filters.sort, boards);
}

// --- Counts and summaries -------------------------------------------------------------------------

export type StatusCounts = Record<ErratumStatus, number>;

export function statusCounts(items: readonly Pick<Erratum, 'status'>[]): StatusCounts {
  const counts = Object.fromEntries(erratumStatuses.map((s) => [s, 0])) as StatusCounts;
  for (const item of items) counts[item.status]++;
  return counts;
}

const statusPhrases: Record<ErratumStatus, string> = {
  open: 'open',
  workaround: 'with a workaround',
  fixed_later: 'fixed later',
  wont_fix: "won't fix",
};

/** "3 open · 2 with a workaround · 4 fixed later · 1 won't fix"; statuses nobody has are left out. */
export function statusSummary(counts: StatusCounts): string {
  const parts = erratumStatuses.filter((s) => counts[s] > 0).map((s) => `${counts[s]} ${statusPhrases[s]}`);
  return parts.length > 0 ? parts.join(' · ') : 'No errata';
}

/**
 * The counts line above the table. `scope` is what the filters other than status let through; when
 * that is not everything, the line says so: "In this view, 7 of 8 errata: 1 open · …".
 */
export function statusLine(total: number, scope: readonly Pick<Erratum, 'status'>[]): string {
  if (total === 0) return 'No errata recorded yet.';
  const counts = statusSummary(statusCounts(scope));
  if (scope.length === total) return `${errataCount(total)}: ${counts}`;
  return `In this view, ${scope.length} of ${errataCount(total)}: ${scope.length === 0 ? 'none' : counts}`;
}

export function errataCount(n: number): string {
  return n === 1 ? '1 erratum' : `${n} errata`;
}

/** "4 errata affect Rev A; 3 have a workaround." */
export function boardSummary(items: readonly Erratum[], boardLabel: string): string {
  const affecting = items.length;
  if (affecting === 0) return `No known erratum affects ${boardLabel}.`;
  const verb = affecting === 1 ? 'affects' : 'affect';
  const withWorkaround = items.filter(hasWorkaround).length;
  let tail: string;
  if (withWorkaround === 0) tail = affecting === 1 ? 'it has no workaround yet' : 'none has a workaround yet';
  else if (affecting === 1) tail = 'it has a workaround';
  else if (withWorkaround === affecting) tail = `all ${affecting} have a workaround`;
  else tail = `${withWorkaround} ${withWorkaround === 1 ? 'has' : 'have'} a workaround`;
  return `${errataCount(affecting)} ${verb} ${boardLabel}; ${tail}.`;
}

export interface BoardAnswer {
  /** Whether the reader can do something about it on the board they hold. */
  workaround: boolean;
  /** The board revision that fixes it, when it is not the reader's own. */
  fixedIn: string | null;
  /** What the row says: "Workaround available · fixed in Rev B". */
  text: string;
}

/** The per-row answer for a reader holding `boardId`; null when the erratum does not affect it. */
export function boardAnswer(erratum: Erratum, boardId: number): BoardAnswer | null {
  if (!affects(erratum, boardId)) return null;
  const workaround = hasWorkaround(erratum);
  const fixedIn =
    erratum.fixedIn && erratum.fixedIn.id !== boardId
      ? erratum.fixedIn.label
      : erratum.status === 'fixed_later'
        ? 'a later revision'
        : null;
  const parts = [workaround ? 'Workaround available' : 'No workaround yet'];
  if (fixedIn) parts.push(`fixed in ${fixedIn}`);
  else if (erratum.status === 'wont_fix') parts.push("won't be fixed");
  return { workaround, fixedIn, text: parts.join(' · ') };
}

// --- The URL ---------------------------------------------------------------------------------------

/**
 * Query keys: `have` (my board, id), `rev` (board ids), `status`, `severity`, `category` (lists
 * joined by commas, or repeated keys), `q` (text) and `sort` (`severity`, or `-severity` for
 * descending). Values that mean nothing are dropped, so an old or edited link still opens.
 */
export const QUERY_KEYS = ['have', 'rev', 'status', 'severity', 'category', 'q', 'sort'] as const;

function values(raw: LocationQueryValue | LocationQueryValue[] | undefined): string[] {
  const list = Array.isArray(raw) ? raw : raw === undefined || raw === null ? [] : [raw];
  return list
    .filter((v): v is string => typeof v === 'string')
    .flatMap((v) => v.split(','))
    .map((v) => v.trim())
    .filter(Boolean);
}

const unique = <T>(list: T[]): T[] => [...new Set(list)];
const ids = (raw: string[]) => unique(raw.filter((v) => /^\d{1,9}$/.test(v)).map(Number)).filter((n) => n > 0);
const oneOf = <T extends string>(allowed: readonly T[], raw: string[]): T[] =>
  unique(raw.filter((v): v is T => (allowed as readonly string[]).includes(v)));

export function filtersFromQuery(query: LocationQuery): ErrataFilters {
  const have = ids(values(query.have))[0] ?? null;
  const sortRaw = values(query.sort)[0] ?? '';
  const descending = sortRaw.startsWith('-');
  const key = (descending ? sortRaw.slice(1) : sortRaw) as ErrataSortKey;
  const sort: ErrataSort = errataSortKeys.includes(key)
    ? { key, order: descending ? 'desc' : 'asc' }
    : { ...DEFAULT_SORT };
  const text = Array.isArray(query.q) ? (query.q[0] ?? '') : (query.q ?? '');
  return {
    myBoard: have,
    boards: ids(values(query.rev)),
    statuses: oneOf(erratumStatuses, values(query.status)),
    severities: oneOf(severities, values(query.severity)),
    categories: unique(values(query.category).filter((v) => /^[a-z0-9]+(?:-[a-z0-9]+)*$/.test(v))),
    text: text.slice(0, 200),
    sort,
  };
}

/** The filters as query values; defaults are left out so a plain view keeps a plain address. */
export function filtersToQuery(filters: ErrataFilters): Record<string, string> {
  const query: Record<string, string> = {};
  if (filters.myBoard !== null) query.have = String(filters.myBoard);
  if (filters.boards.length > 0) query.rev = filters.boards.join(',');
  if (filters.statuses.length > 0) query.status = filters.statuses.join(',');
  if (filters.severities.length > 0) query.severity = filters.severities.join(',');
  if (filters.categories.length > 0) query.category = filters.categories.join(',');
  if (filters.text.trim() !== '') query.q = filters.text.trim();
  const sort = filters.sort;
  if (sort.key !== DEFAULT_SORT.key || sort.order !== DEFAULT_SORT.order) {
    query.sort = `${sort.order === 'desc' ? '-' : ''}${sort.key}`;
  }
  return query;
}
