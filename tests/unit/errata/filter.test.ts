/**
 * The errata table's logic on the invented greenhouse node (fixtures.ts): six errata over Rev A,
 * Rev B and Rev C. Every expectation below was worked out by hand from the fixture records.
 */
import { describe, expect, it } from 'vitest';
import {
  boardAnswer,
  boardSummary,
  emptyFilters,
  filterErrata,
  filtersFromQuery,
  filtersToQuery,
  hasWorkaround,
  isFiltered,
  selectErrata,
  sortErrata,
  statusCounts,
  statusLine,
  statusSummary,
  type ErrataFilters,
} from '@/components/errata/filter';
import { boards, codes, erratum, errata, revA, revB, revC } from './fixtures';

const withFilters = (patch: Partial<ErrataFilters>): ErrataFilters => ({ ...emptyFilters(), ...patch });
const byCode = (code: string) => errata.find((e) => e.code === code)!;

describe('applies to my board', () => {
  it('picking Rev A keeps exactly the errata whose affected revisions include Rev A', () => {
    const rows = selectErrata(errata, withFilters({ myBoard: revA.id }), boards);
    expect(codes(rows)).toEqual(['E1', 'E2', 'E3', 'E4']);
  });

  it('picking Rev B keeps E2 (Rev A and B), E5 and E6, and Rev C only E6', () => {
    expect(codes(selectErrata(errata, withFilters({ myBoard: revB.id }), boards))).toEqual(['E2', 'E5', 'E6']);
    expect(codes(selectErrata(errata, withFilters({ myBoard: revC.id }), boards))).toEqual(['E6']);
  });

  it('answers per row whether the Rev A holder has a workaround and which revision fixes it', () => {
    expect(boardAnswer(byCode('E1'), revA.id)?.text).toBe('Workaround available · fixed in Rev B');
    expect(boardAnswer(byCode('E2'), revA.id)?.text).toBe('No workaround yet');
    expect(boardAnswer(byCode('E3'), revA.id)?.text).toBe("No workaround yet · won't be fixed");
    expect(boardAnswer(byCode('E4'), revA.id)?.text).toBe('Workaround available · fixed in Rev B');
    expect(boardAnswer(byCode('E5'), revB.id)).toMatchObject({ workaround: true, fixedIn: 'Rev C' });
  });

  it('has no answer for a board the erratum does not affect', () => {
    expect(boardAnswer(byCode('E5'), revA.id)).toBeNull();
  });

  it('says "fixed in a later revision" when the status says fixed but no revision is named', () => {
    const e = erratum(9, { status: 'fixed_later', fixedIn: null, affected: [revA] });
    expect(boardAnswer(e, revA.id)?.text).toBe('No workaround yet · fixed in a later revision');
  });

  it('summarises how many errata affect the board and how many have a workaround', () => {
    const onA = filterErrata(errata, withFilters({ myBoard: revA.id }));
    expect(boardSummary(onA, 'Rev A')).toBe('4 errata affect Rev A; 2 have a workaround.');
    const onB = filterErrata(errata, withFilters({ myBoard: revB.id }));
    expect(boardSummary(onB, 'Rev B')).toBe('3 errata affect Rev B; 1 has a workaround.');
    const onC = filterErrata(errata, withFilters({ myBoard: revC.id }));
    expect(boardSummary(onC, 'Rev C')).toBe('1 erratum affects Rev C; it has no workaround yet.');
    expect(boardSummary([], 'Rev D')).toBe('No known erratum affects Rev D.');
    expect(boardSummary([byCode('E1'), byCode('E4')], 'Rev A')).toBe('2 errata affect Rev A; all 2 have a workaround.');
  });
});

describe('filters', () => {
  it('counts a written workaround or the "workaround available" status as a workaround', () => {
    expect(errata.filter(hasWorkaround).map((e) => e.code)).toEqual(['E1', 'E4', 'E5']);
    expect(hasWorkaround(erratum(9, { status: 'workaround', workaround: '' }))).toBe(true);
    expect(hasWorkaround(erratum(9, { status: 'open', workaround: '   \n' }))).toBe(false);
  });

  it('combines status and severity: open and critical is E2 alone', () => {
    const rows = filterErrata(errata, withFilters({ statuses: ['open'], severities: ['critical'] }));
    expect(codes(rows)).toEqual(['E2']);
  });

  it('keeps errata affecting any of the chosen board revisions', () => {
    expect(codes(filterErrata(errata, withFilters({ boards: [revA.id, revC.id] })))).toEqual([
      'E1',
      'E2',
      'E3',
      'E4',
      'E6',
    ]);
  });

  it('filters by category slug', () => {
    expect(codes(filterErrata(errata, withFilters({ categories: ['power'] })))).toEqual(['E2', 'E5']);
    expect(codes(filterErrata(errata, withFilters({ categories: ['power', 'firmware'] })))).toEqual(['E2', 'E5', 'E6']);
  });

  it('finds words in title, symptom, cause, reference designators, parts and pins, ignoring case', () => {
    expect(codes(filterErrata(errata, withFilters({ text: 'gpio35' })))).toEqual(['E1']);
    expect(codes(filterErrata(errata, withFilters({ text: 'u3' })))).toEqual(['E2']);
    expect(codes(filterErrata(errata, withFilters({ text: 'xm-32' })))).toEqual(['E1']);
    expect(codes(filterErrata(errata, withFilters({ text: 'input-only' })))).toEqual(['E1']);
    expect(codes(filterErrata(errata, withFilters({ text: 'pump' })))).toEqual(['E2']);
  });

  it('needs every word to match, in any field and any order', () => {
    expect(codes(filterErrata(errata, withFilters({ text: 'motor  resets' })))).toEqual(['E5']);
    expect(codes(filterErrata(errata, withFilters({ text: 'relay U3' })))).toEqual([]);
  });

  it('does not search the workaround text', () => {
    // "GPIO25" appears only in E1's workaround.
    expect(codes(filterErrata(errata, withFilters({ text: 'GPIO25' })))).toEqual([]);
  });

  it('can leave one filter out, for counts that stay meaningful while that filter changes', () => {
    const filters = withFilters({ myBoard: revA.id, statuses: ['open'] });
    expect(codes(filterErrata(errata, filters))).toEqual(['E2']);
    expect(codes(filterErrata(errata, filters, ['statuses']))).toEqual(['E1', 'E2', 'E3', 'E4']);
  });

  it('knows when nothing narrows the list', () => {
    expect(isFiltered(emptyFilters())).toBe(false);
    expect(isFiltered({ ...emptyFilters(), sort: { key: 'title', order: 'desc' } })).toBe(false);
    expect(isFiltered(withFilters({ text: '  ' }))).toBe(false);
    expect(isFiltered(withFilters({ severities: ['minor'] }))).toBe(true);
  });
});

describe('sorting', () => {
  it('puts critical first when sorting by severity, descending, with ties by number', () => {
    const rows = sortErrata(errata, { key: 'severity', order: 'desc' }, boards);
    expect(codes(rows)).toEqual(['E2', 'E4', 'E1', 'E5', 'E6', 'E3']);
  });

  it("sorts by status in the order open, workaround, fixed later, won't fix", () => {
    expect(codes(sortErrata(errata, { key: 'status', order: 'asc' }, boards))).toEqual([
      'E2',
      'E6',
      'E1',
      'E5',
      'E4',
      'E3',
    ]);
  });

  it("sorts by the earliest affected revision in the project's board order", () => {
    expect(codes(sortErrata(errata, { key: 'affected', order: 'desc' }, boards))).toEqual([
      'E5',
      'E6',
      'E1',
      'E2',
      'E3',
      'E4',
    ]);
  });

  it('sorts by workaround, title and last update', () => {
    expect(codes(sortErrata(errata, { key: 'workaround', order: 'desc' }, boards))).toEqual([
      'E1',
      'E4',
      'E5',
      'E2',
      'E3',
      'E6',
    ]);
    expect(codes(sortErrata(errata, { key: 'title', order: 'asc' }, boards))).toEqual([
      'E5',
      'E2',
      'E1',
      'E3',
      'E4',
      'E6',
    ]);
    expect(codes(sortErrata(errata, { key: 'updated', order: 'desc' }, boards))).toEqual([
      'E6',
      'E5',
      'E4',
      'E3',
      'E2',
      'E1',
    ]);
  });

  it('does not reorder the list it is given', () => {
    const copy = [...errata];
    sortErrata(errata, { key: 'number', order: 'desc' }, boards);
    expect(errata).toEqual(copy);
  });
});

describe('status counts', () => {
  it('counts each status once per erratum', () => {
    expect(statusCounts(errata)).toEqual({ open: 2, workaround: 2, fixed_later: 1, wont_fix: 1 });
  });

  it('reads as one line and leaves out statuses nobody has', () => {
    expect(statusSummary(statusCounts(errata))).toBe("2 open · 2 with a workaround · 1 fixed later · 1 won't fix");
    expect(statusSummary({ open: 3, workaround: 0, fixed_later: 4, wont_fix: 0 })).toBe('3 open · 4 fixed later');
    expect(statusSummary(statusCounts([]))).toBe('No errata');
  });

  it('says when the counts cover only part of the errata', () => {
    expect(statusLine(6, errata)).toBe("6 errata: 2 open · 2 with a workaround · 1 fixed later · 1 won't fix");
    const onC = filterErrata(errata, withFilters({ myBoard: revC.id }));
    expect(statusLine(6, onC)).toBe('In this view, 1 of 6 errata: 1 open');
    expect(statusLine(6, [])).toBe('In this view, 0 of 6 errata: none');
    expect(statusLine(0, [])).toBe('No errata recorded yet.');
  });
});

describe('the URL query', () => {
  const shared: ErrataFilters = {
    myBoard: revA.id,
    boards: [revA.id, revC.id],
    statuses: ['open', 'workaround'],
    severities: ['critical'],
    categories: ['power'],
    text: 'motor',
    sort: { key: 'severity', order: 'desc' },
  };

  it('writes every filter under its own key', () => {
    expect(filtersToQuery(shared)).toEqual({
      have: '11',
      rev: '11,13',
      status: 'open,workaround',
      severity: 'critical',
      category: 'power',
      q: 'motor',
      sort: '-severity',
    });
  });

  it('reads back what it wrote', () => {
    expect(filtersFromQuery(filtersToQuery(shared))).toEqual(shared);
  });

  it('leaves defaults out, so the plain table has a plain address', () => {
    expect(filtersToQuery(emptyFilters())).toEqual({});
    expect(filtersFromQuery({})).toEqual(emptyFilters());
  });

  it('reads repeated keys as well as comma lists', () => {
    const filters = filtersFromQuery({ status: ['open', 'wont_fix'], rev: ['12', '11,12'] });
    expect(filters.statuses).toEqual(['open', 'wont_fix']);
    expect(filters.boards).toEqual([12, 11]);
  });

  it('drops values that mean nothing instead of failing', () => {
    const filters = filtersFromQuery({
      have: 'rev-a',
      status: 'open,closed',
      severity: 'CRITICAL',
      category: 'Power!,power',
      sort: '-colour',
    });
    expect(filters).toEqual({ ...emptyFilters(), statuses: ['open'], categories: ['power'] });
  });

  it('reads an ascending sort without a sign', () => {
    expect(filtersFromQuery({ sort: 'updated' }).sort).toEqual({ key: 'updated', order: 'asc' });
  });
});
