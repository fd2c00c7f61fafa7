/**
 * How search hits are named and ordered in the search UI: one word per kind, the facet groups'
 * headings, and the order of kinds in the top bar's list (known mistakes first: they are what a
 * reader about to use a part is looking for).
 */
import type { SearchKind } from '@shared/contracts/search';
import type { FacetGroup } from '@/composables/search';

export const kindNames: Record<SearchKind, string> = {
  erratum: 'Erratum',
  lesson: 'Lesson',
  project: 'Project',
  section: 'Write-up section',
  log_entry: 'Log entry',
  part: 'Part',
  tag: 'Tag',
};

export const kindGroupNames: Record<SearchKind, string> = {
  erratum: 'Errata',
  lesson: 'Lessons',
  project: 'Projects',
  section: 'Write-up sections',
  log_entry: 'Log entries',
  part: 'Parts',
  tag: 'Tags',
};

export const kindOrder: readonly SearchKind[] = ['erratum', 'lesson', 'project', 'part', 'tag', 'section', 'log_entry'];

export const facetGroupNames: Record<FacetGroup, string> = {
  kind: 'Kind',
  severity: 'Severity',
  status: 'Status',
  category: 'Category',
  tag: 'Tag',
  part: 'Part',
  project: 'Project',
};

/** A chosen filter as the search page lists it. */
export interface ActiveFilter {
  /** A facet group, or the "Known mistakes only" toggle. */
  group: FacetGroup | 'mistakes';
  value: string;
  /** What the chip says, e.g. "Severity: Critical". */
  text: string;
}

/** Hits grouped by kind in `kindOrder`, keeping the server's ranking inside each group. */
export function groupByKind<T extends { kind: SearchKind }>(hits: readonly T[]): { kind: SearchKind; hits: T[] }[] {
  return kindOrder
    .map((kind) => ({ kind, hits: hits.filter((h) => h.kind === kind) }))
    .filter((group) => group.hits.length > 0);
}

const numbers = new Intl.NumberFormat('en');

/** "1 result", "32 results", "about 2,000 results". */
export function totalLine(total: { value: number; exact: boolean }): string {
  const n = numbers.format(total.value);
  const noun = total.value === 1 ? 'result' : 'results';
  return total.exact ? `${n} ${noun}` : `About ${n} ${noun}`;
}
