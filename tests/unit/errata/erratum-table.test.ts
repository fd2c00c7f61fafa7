// @vitest-environment happy-dom
/**
 * The errata table as a reader uses it: which rows and answers it shows for the board they hold,
 * where the links lead, how a header click asks for a new sort, and what an empty result offers.
 */
import '../editor/vuetify-env';
import { flushPromises, mount, type VueWrapper } from '@vue/test-utils';
import { afterEach, describe, expect, it } from 'vitest';
import { createMemoryHistory, createRouter } from 'vue-router';
import { createVuetify } from 'vuetify';
import ErratumTable from '@/components/errata/ErratumTable.vue';
import { emptyFilters, type ErrataFilters } from '@/components/errata/filter';
import { boards, errata, revA, revB } from './fixtures';

let wrapper: VueWrapper | null = null;
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
});

async function mountTable(
  filters: Partial<ErrataFilters> = {},
  extra: { layout?: 'auto' | 'table' | 'cards'; items?: typeof errata } = {},
) {
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/', component: { template: '<div />' } },
      { path: '/projects/:slug/errata/:code', name: 'erratum', component: { template: '<div />' } },
    ],
  });
  await router.push('/');
  await router.isReady();
  wrapper = mount(ErratumTable, {
    props: {
      errata: extra.items ?? errata,
      boards,
      filters: { ...emptyFilters(), ...filters },
      slug: 'greenhouse-node',
      ...(extra.layout ? { layout: extra.layout } : {}),
    },
    global: { plugins: [createVuetify(), router] },
    attachTo: document.body,
  });
  await flushPromises();
  return wrapper;
}

/** happy-dom's own control of the window size, which Vuetify's display reads. */
function setViewport(size: { width: number; height: number }) {
  (window as unknown as { happyDOM: { setViewport(s: { width: number; height: number }): void } }).happyDOM.setViewport(
    size,
  );
}

function bodyRows(w: VueWrapper) {
  return w.findAll('tbody tr');
}

function cellTexts(w: VueWrapper, column: number) {
  return bodyRows(w).map((row) => row.findAll('td')[column]!.text());
}

describe('ErratumTable', () => {
  it('shows every erratum in number order, each number linking to its page', async () => {
    const w = await mountTable();
    expect(w.find('table').exists()).toBe(true);
    expect(cellTexts(w, 0)).toEqual(['E1', 'E2', 'E3', 'E4', 'E5', 'E6']);
    const link = bodyRows(w)[1]!.find('td a');
    expect(link.attributes('href')).toBe('/projects/greenhouse-node/errata/E2');
  });

  it('for a Rev A holder lists only the errata affecting Rev A, with what they can do about each', async () => {
    const w = await mountTable({ myBoard: revA.id });
    const headers = w.findAll('thead th').map((th) => th.text());
    expect(headers).toContain('On your Rev A');
    expect(cellTexts(w, 0)).toEqual(['E1', 'E2', 'E3', 'E4']);
    expect(w.findAll('[data-testid="board-answer"]').map((a) => a.text())).toEqual([
      'Workaround available · fixed in Rev B',
      'No workaround yet',
      "No workaround yet · won't be fixed",
      'Workaround available · fixed in Rev B',
    ]);
  });

  it('tells severities apart by word, not colour alone', async () => {
    const w = await mountTable({ severities: ['critical'] });
    const chips = w.findAll('[data-severity]');
    expect(chips.map((c) => c.attributes('data-severity'))).toEqual(['critical', 'critical']);
    expect(chips[0]!.text()).toContain('Critical');
    expect(chips[0]!.find('svg, .v-icon').exists()).toBe(true);
  });

  it('lists affected revisions in board order and says whether a workaround exists', async () => {
    const w = await mountTable({ myBoard: revB.id });
    // Columns: No., Title, On your Rev B, Severity, Status, Affects, Category, Workaround, Updated.
    expect(cellTexts(w, 5)).toEqual(['Rev A, Rev B', 'Rev B', 'Rev B, Rev C']);
    expect(cellTexts(w, 7)).toEqual(['no', 'yes', 'no']);
  });

  it('asks for the opposite order when the sorted column header is clicked', async () => {
    const w = await mountTable({ sort: { key: 'severity', order: 'asc' } });
    const severityHeader = w.findAll('thead th').find((th) => th.text().includes('Severity'))!;
    await severityHeader.trigger('click');
    expect(w.emitted('update:sort')?.at(-1)).toEqual([{ key: 'severity', order: 'desc' }]);
  });

  it('sorts by another column from the keyboard', async () => {
    const w = await mountTable();
    const titleHeader = w.findAll('thead th').find((th) => th.text().includes('Title'))!;
    expect(titleHeader.attributes('tabindex')).toBe('0');
    await titleHeader.trigger('keydown', { key: 'Enter' });
    expect(w.emitted('update:sort')?.at(-1)).toEqual([{ key: 'title', order: 'asc' }]);
  });

  it('shows the rows in the order it is given by the filters, without sorting them again', async () => {
    const w = await mountTable({ sort: { key: 'severity', order: 'desc' } });
    expect(cellTexts(w, 0)).toEqual(['E2', 'E4', 'E1', 'E5', 'E6', 'E3']);
  });

  it('offers to clear the filters when nothing matches', async () => {
    const w = await mountTable({ text: 'no such words anywhere' });
    expect(w.find('[data-testid="errata-empty"]').text()).toContain('No erratum matches these filters.');
    const clear = w.findAll('button').find((b) => b.text().includes('Clear the filters'))!;
    await clear.trigger('click');
    expect(w.emitted('clear-filters')).toHaveLength(1);
  });

  it('says so when the project has no errata at all, with nothing to clear', async () => {
    const w = await mountTable({}, { items: [] });
    expect(w.find('[data-testid="errata-empty"]').text()).toContain('No errata recorded for this project yet.');
    expect(w.findAll('button').some((b) => b.text().includes('Clear the filters'))).toBe(false);
  });

  it('shows the same rows and answers as cards on a phone', async () => {
    setViewport({ width: 390, height: 844 });
    const w = await mountTable({ myBoard: revA.id, sort: { key: 'severity', order: 'desc' } });
    setViewport({ width: 1280, height: 800 });
    expect(w.find('table').exists()).toBe(false);
    const cards = w.findAll('li[data-code]');
    expect(cards.map((c) => c.attributes('data-code'))).toEqual(['E2', 'E4', 'E1', 'E3']);
    expect(cards[0]!.find('[data-testid="board-answer"]').text()).toContain('No workaround yet');
    expect(cards[0]!.find('a').attributes('href')).toBe('/projects/greenhouse-node/errata/E2');
  });
});
