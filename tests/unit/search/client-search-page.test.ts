// @vitest-environment happy-dom
/**
 * The search page as a reader works it: facet chips with counts that allow several choices per
 * group and land in the address, the chosen filters as closable chips, the totals and notes the
 * API's answer calls for, the help when there is nothing to search yet, and filters folded away
 * on a phone. The API is a fake answering hand-written results.
 */
import '../editor/vuetify-env';
import type { SearchHit, SearchQueryInput, SearchResult } from '@shared/contracts/search';
import { flushPromises, mount, type VueWrapper } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { defineComponent, h } from 'vue';
import { createMemoryHistory, createRouter, type Router } from 'vue-router';
import { createVuetify } from 'vuetify';
import { errataApi } from '@/composables/errata';
import { searchApi } from '@/composables/search';
import SearchPage from '@/pages/SearchPage.vue';

function setViewport(width: number, height: number) {
  (window as unknown as { happyDOM: { setViewport(s: { width: number; height: number }): void } }).happyDOM.setViewport(
    { width, height },
  );
}

function hit(partial: Partial<SearchHit> & Pick<SearchHit, 'id' | 'kind' | 'title' | 'url'>): SearchHit {
  return {
    titleHtml: partial.title,
    snippetHtml: '',
    project: { slug: 'tide-clock', title: 'Tide clock' },
    category: null,
    severity: null,
    status: null,
    tags: [],
    parts: [],
    pins: [],
    updatedAt: '2026-05-01T10:00:00.000Z',
    ...partial,
  };
}

const critical = [
  hit({
    id: 1,
    kind: 'erratum',
    title: 'E3 Boot loop with the dial board fitted',
    url: '/projects/tide-clock/errata/E3',
    severity: 'critical',
    status: 'fixed_later',
    category: 'pin-capability',
    tags: ['strapping-pin'],
  }),
];
const major = [
  hit({
    id: 2,
    kind: 'erratum',
    title: 'E1 LED ring stays dark: GPIO35 is input only',
    url: '/projects/tide-clock/errata/E1',
    severity: 'major',
    status: 'fixed_later',
  }),
];
const lesson = [
  hit({
    id: 3,
    kind: 'lesson',
    title: 'Check what every connector brings to the strapping pins',
    url: '/projects/tide-clock#lessons',
  }),
];

/** A small fake of the API's filtering and counting over these items (facets under every filter, as the server counts). */
function fakeSearch(params: SearchQueryInput): SearchResult {
  const all = [...critical, ...major, ...lesson];
  const severity = (params.severity as string[] | undefined) ?? [];
  const kind = (params.kind as string[] | undefined) ?? [];
  const items = all.filter(
    (i) => (!severity.length || severity.includes(i.severity ?? '')) && (!kind.length || kind.includes(i.kind)),
  );
  const count = (key: 'severity' | 'kind', labels: Record<string, string>) =>
    Object.entries(labels)
      .map(([value, label]) => ({ value, label, count: items.filter((i) => i[key] === value).length }))
      .filter((f) => f.count > 0);
  return {
    query: params.q ?? '',
    correctedQuery: null,
    suggestions: [],
    total: { value: items.length, exact: true },
    page: 1,
    pageSize: 20,
    items,
    facets: {
      kind: count('kind', { erratum: 'Errata', lesson: 'Lessons' }),
      severity: count('severity', { critical: 'Critical', major: 'Major' }),
      status: [],
      category: items.some((i) => i.category) ? [{ value: 'pin-capability', label: 'pin-capability', count: 1 }] : [],
      tag: [],
      part: [],
      project: [{ value: 'tide-clock', label: 'Tide clock', count: items.length }],
    },
    facetsApproximate: false,
    backend: 'postgres',
  };
}

const Page = defineComponent({ render: () => h('p', 'page') });

let wrapper: VueWrapper | null = null;
let calls: SearchQueryInput[] = [];
let respond: (params: SearchQueryInput) => SearchResult = fakeSearch;

beforeEach(() => {
  setActivePinia(createPinia());
  calls = [];
  respond = fakeSearch;
  vi.spyOn(searchApi, 'search').mockImplementation(async (params) => {
    calls.push(params);
    return respond(params);
  });
  vi.spyOn(errataApi, 'categories').mockResolvedValue({
    items: [{ slug: 'pin-capability', name: 'Pin capability', description: '' }],
  });
});
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  document.body.innerHTML = '';
  vi.restoreAllMocks();
  setViewport(1280, 800);
});

async function mountAt(path: string): Promise<Router> {
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/search', name: 'search', component: Page },
      { path: '/projects/:slug', name: 'project', component: Page },
      { path: '/:rest(.*)*', name: 'elsewhere', component: Page },
    ],
  });
  await router.push(path);
  wrapper = mount(SearchPage, { global: { plugins: [router, createVuetify()] }, attachTo: document.body });
  await flushPromises();
  return router;
}

const group = (name: string) =>
  wrapper!.findAll('[role="group"]').find((g) => g.find('h3').exists() && g.get('h3').text() === name)!;
const chip = (groupName: string, value: string) => group(groupName).get(`button[data-value="${value}"]`);
const resultTitles = () => wrapper!.findAll('[data-testid="search-result-link"]').map((a) => a.text());
const url = (router: Router) => new URL(router.currentRoute.value.fullPath, 'http://localhost');

describe('SearchPage', () => {
  it('shows the results with their facets and counts for the words in the address', async () => {
    await mountAt('/search?q=pin');
    expect(calls[0]).toEqual({ q: 'pin', pageSize: 20 });
    expect(resultTitles()).toEqual([
      'E3 Boot loop with the dial board fitted',
      'E1 LED ring stays dark: GPIO35 is input only',
      'Check what every connector brings to the strapping pins',
    ]);
    expect(wrapper!.get('[data-testid="search-total"]').text()).toBe('3 results for “pin”');
    expect(chip('Severity', 'critical').text()).toMatch(/Critical\s*1/);
    expect(chip('Kind', 'erratum').text()).toMatch(/Errata\s*2/);
    // Category slugs are shown by name.
    expect(chip('Category', 'pin-capability').text()).toContain('Pin capability');
    // Errata carry their severity and status chips.
    const first = wrapper!.get('[data-testid="search-results"] li');
    expect(first.get('[data-severity]').attributes('data-severity')).toBe('critical');
    expect(first.get('[data-status]').attributes('data-status')).toBe('fixed_later');
  });

  it('lets the reader pick several severities: each becomes a repeated parameter, and the group keeps offering the rest', async () => {
    const router = await mountAt('/search?q=pin');
    await chip('Severity', 'critical').trigger('click');
    await flushPromises();
    expect(url(router).searchParams.getAll('severity')).toEqual(['critical']);
    expect(resultTitles()).toEqual(['E3 Boot loop with the dial board fitted']);
    expect(chip('Severity', 'critical').attributes('aria-pressed')).toBe('true');
    // The API counts under every filter; the page asks again without the severity filter for this group.
    expect(calls).toContainEqual({ q: 'pin', pageSize: 1 });
    expect(chip('Severity', 'major').attributes('aria-pressed')).toBe('false');
    expect(chip('Severity', 'major').text()).toMatch(/Major\s*1/);

    await chip('Severity', 'major').trigger('click');
    await flushPromises();
    expect(url(router).searchParams.getAll('severity')).toEqual(['critical', 'major']);
    expect(resultTitles()).toHaveLength(2);
  });

  it('lists the chosen filters as closable chips and clears them all, keeping the words', async () => {
    const router = await mountAt('/search?q=pin&severity=critical&kind=erratum&mistakes=1');
    const chosen = wrapper!.get('[aria-label="Chosen filters"]');
    expect(chosen.findAll('.v-chip').map((c) => c.text())).toEqual([
      'Known mistakes only',
      'Kind: Errata',
      'Severity: Critical',
    ]);
    await chosen.get('[aria-label="Remove the filter Severity: Critical"]').trigger('click');
    await flushPromises();
    expect(url(router).searchParams.has('severity')).toBe(false);
    expect(url(router).searchParams.getAll('kind')).toEqual(['erratum']);

    await wrapper!.get('[data-testid="search-clear-filters"]').trigger('click');
    await flushPromises();
    expect(url(router).search).toBe('?q=pin');
  });

  it('says "about" when the total is an estimate, and when facet counts cover only the best matches', async () => {
    respond = (params) => ({ ...fakeSearch(params), total: { value: 2000, exact: false }, facetsApproximate: true });
    await mountAt('/search?q=the%20board');
    expect(wrapper!.get('[data-testid="search-total"]').text()).toBe('About 2,000 results for “the board”');
    expect(wrapper!.find('[data-testid="facets-approximate"]').exists()).toBe(true);
    // 2,000 results at 20 a page, but the API serves 50 pages at most.
    expect(wrapper!.findAll('.v-pagination__item').at(-1)!.text()).toBe('50');
  });

  it('says what was searched instead of a likely typo, and can search for the words as typed', async () => {
    respond = (params) => ({ ...fakeSearch(params), query: 'atmaga328', correctedQuery: 'atmega328p' });
    const router = await mountAt('/search?q=atmaga328');
    const line = wrapper!.get('[data-testid="search-corrected"]');
    expect(line.text()).toBe('Showing results for atmega328p; search instead for atmaga328');
    await line.findAll('a').at(-1)!.trigger('click');
    await flushPromises();
    expect(url(router).searchParams.get('exact')).toBe('1');
    expect(resultTitles()).toEqual([]);
    expect(wrapper!.get('[data-testid="search-corrected"]').text()).toContain('Nothing matches atmaga328 as typed');
  });

  it('offers other words when nothing matched', async () => {
    respond = (params) => ({
      ...fakeSearch({ ...params, kind: ['part'] }),
      suggestions: ['thermal', 'their'],
    });
    await mountAt('/search?q=thermel');
    const line = wrapper!.get('[data-testid="search-suggestions"]');
    expect(line.text()).toBe('Did you mean thermal, their?');
    expect(line.findAll('a').map((a) => a.attributes('href'))).toEqual(['/search?q=thermal', '/search?q=their']);
    expect(wrapper!.text()).toContain('Nothing found for “thermel”.');
  });

  it('helps with example queries, each explained, before anything is searched', async () => {
    await mountAt('/search');
    expect(calls).toEqual([]);
    const links = wrapper!.findAll('.search-help a').map((a) => [a.text(), a.attributes('href')]);
    expect(links).toEqual([
      ['GPIO35 output', '/search?q=GPIO35+output'],
      ['RP2040 5V', '/search?q=RP2040+5V'],
      ['regulator hot', '/search?q=regulator+hot'],
      ['analog only pin', '/search?q=analog+only+pin'],
      ['"boot loop"', '/search?q=%22boot+loop%22'],
      ['relay -mains', '/search?q=relay+-mains'],
      ['3V3 OR 3.3V', '/search?q=3V3+OR+3.3V'],
    ]);
    expect(wrapper!.text()).toContain('A minus sign leaves out items with that word.');
  });

  it('folds the filters behind a "Filters" button on a phone', async () => {
    setViewport(390, 800);
    await mountAt('/search?q=pin&severity=critical');
    const toggle = wrapper!.get('[data-testid="search-filters-toggle"]');
    expect(toggle.text()).toBe('Filters (1 chosen)');
    expect(toggle.attributes('aria-expanded')).toBe('false');
    const panel = document.getElementById(toggle.attributes('aria-controls')!)!;
    expect(panel.style.display).toBe('none');
    await toggle.trigger('click');
    expect(toggle.attributes('aria-expanded')).toBe('true');
    expect(panel.style.display).toBe('');
  });

  it('searches for new words on submit and goes back to page 1', async () => {
    const router = await mountAt('/search?q=pin&page=2');
    const field = wrapper!.get('[data-testid="search-page-field"] input');
    await field.setValue('relay -mains');
    await wrapper!.get('form[role="search"]').trigger('submit');
    await flushPromises();
    expect(url(router).search).toBe('?q=relay+-mains');
    expect(calls.at(-1)).toEqual({ q: 'relay -mains', pageSize: 20 });
  });
});
