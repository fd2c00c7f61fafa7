// @vitest-environment happy-dom
/**
 * The search state in the address bar and in the API request: a shared link opens the same
 * search, filters travel as repeated parameters, and what the client sends is what the server's
 * own contract reads back.
 */
import { parse as parseQueryString } from 'node:querystring';
import { searchQuerySchema } from '@shared/contracts/search';
import { flushPromises, mount } from '@vue/test-utils';
import { describe, expect, it } from 'vitest';
import { defineComponent, h } from 'vue';
import { createMemoryHistory, createRouter, type Router } from 'vue-router';
import {
  apiParamsOf,
  emptySearchState,
  searchQueryString,
  stateFromQuery,
  stateToQuery,
  useSearchQuery,
} from '@/composables/search';

const Page = { render: () => h('p', 'page') };

async function routerAt(path: string): Promise<Router> {
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/', name: 'home', component: Page },
      { path: '/search', name: 'search', component: Page },
    ],
  });
  await router.push(path);
  return router;
}

describe('the search address', () => {
  it('reads words, repeated filters, the toggle and the page from a shared link', async () => {
    const router = await routerAt(
      '/search?q=GPIO35%20output&kind=erratum&kind=lesson&severity=critical&severity=major&tag=input-only-pin&mistakes=1&page=2',
    );
    expect(stateFromQuery(router.currentRoute.value.query)).toEqual({
      ...emptySearchState(),
      q: 'GPIO35 output',
      kind: ['erratum', 'lesson'],
      severity: ['critical', 'major'],
      tag: ['input-only-pin'],
      mistakes: true,
      page: 2,
    });
  });

  it('writes repeated parameters that open the same search again', async () => {
    const state = {
      ...emptySearchState(),
      q: 'relay -mains',
      kind: ['erratum' as const],
      status: ['open' as const, 'workaround' as const],
      project: ['greenhouse-vent-controller', 'tide-clock'],
    };
    const router = await routerAt('/');
    await router.push({ name: 'search', query: stateToQuery(state) });
    const url = new URL(router.currentRoute.value.fullPath, 'http://localhost');
    expect(url.pathname).toBe('/search');
    expect(url.searchParams.getAll('status')).toEqual(['open', 'workaround']);
    expect(url.searchParams.getAll('project')).toEqual(['greenhouse-vent-controller', 'tide-clock']);
    expect(url.searchParams.get('q')).toBe('relay -mains');
    // Defaults stay out of the address.
    expect(url.searchParams.has('page')).toBe(false);
    expect(url.searchParams.has('mistakes')).toBe(false);

    const reopened = await routerAt(router.currentRoute.value.fullPath);
    expect(stateFromQuery(reopened.currentRoute.value.query)).toEqual(state);
  });

  it('keeps what still makes sense from an edited link and drops the rest', async () => {
    const router = await routerAt(
      '/search?q=pin&severity=dreadful&severity=major&kind=widget&kind=part&page=900&mistakes=maybe',
    );
    expect(stateFromQuery(router.currentRoute.value.query)).toEqual({
      ...emptySearchState(),
      q: 'pin',
      severity: ['major'],
      kind: ['part'],
    });
  });

  it('sends the API the filters as repeated parameters that the server contract reads back', () => {
    const state = {
      ...emptySearchState(),
      q: '3V3 OR 3.3V',
      kind: ['erratum' as const, 'lesson' as const],
      severity: ['critical' as const],
      category: ['logic-level'],
      mistakes: true,
      page: 3,
    };
    const sent = searchQueryString(apiParamsOf(state));
    expect(new URLSearchParams(sent).getAll('kind')).toEqual(['erratum', 'lesson']);
    // Express reads query strings with Node's querystring: repeated keys become arrays.
    expect(searchQuerySchema.parse(parseQueryString(sent))).toEqual({
      q: '3V3 OR 3.3V',
      kind: ['erratum', 'lesson'],
      category: ['logic-level'],
      severity: ['critical'],
      status: [],
      tag: [],
      part: [],
      project: [],
      mistakes: true,
      // The page declines a correction itself and never asks the API to search exactly.
      exact: false,
      page: 3,
      pageSize: 20,
    });
  });

  it('sends one filter value as one parameter the contract still reads as a list', () => {
    const sent = searchQueryString(apiParamsOf({ ...emptySearchState(), q: 'pin', severity: ['critical'] }));
    expect(sent).toBe('q=pin&severity=critical&pageSize=20');
    expect(searchQuerySchema.parse(parseQueryString(sent)).severity).toEqual(['critical']);
  });
});

describe('useSearchQuery', () => {
  async function mountAt(path: string) {
    const router = await routerAt(path);
    let api!: ReturnType<typeof useSearchQuery>;
    mount(
      defineComponent({
        setup() {
          api = useSearchQuery();
          return () => h('p');
        },
      }),
      { global: { plugins: [router] } },
    );
    return { router, api, url: () => new URL(router.currentRoute.value.fullPath, 'http://localhost') };
  }

  it('adds a second chip of a group as a second parameter and goes back to page 1', async () => {
    const { api, url } = await mountAt('/search?q=pin&severity=critical&page=3');
    api.toggle('severity', 'major');
    await flushPromises();
    expect(url().searchParams.getAll('severity')).toEqual(['critical', 'major']);
    expect(url().searchParams.has('page')).toBe(false);
    expect(api.params.value).toMatchObject({ q: 'pin', severity: ['critical', 'major'] });
  });

  it('takes a chosen chip away when toggled again, keeping the others', async () => {
    const { api, url } = await mountAt('/search?q=pin&severity=critical&severity=major&tag=bodge-wire');
    api.toggle('severity', 'critical');
    await flushPromises();
    expect(url().searchParams.getAll('severity')).toEqual(['major']);
    expect(url().searchParams.getAll('tag')).toEqual(['bodge-wire']);
  });

  it('builds two quick changes on each other instead of losing the first', async () => {
    const { api, url } = await mountAt('/search?q=pin');
    api.toggle('severity', 'critical');
    api.toggle('kind', 'erratum');
    await flushPromises();
    expect(url().searchParams.getAll('severity')).toEqual(['critical']);
    expect(url().searchParams.getAll('kind')).toEqual(['erratum']);
  });

  it('clears the filters and the toggle but keeps the words', async () => {
    const { api, url } = await mountAt('/search?q=regulator%20hot&kind=erratum&part=RP2040&mistakes=1');
    api.clearFilters();
    await flushPromises();
    expect(url().search).toBe('?q=regulator+hot');
  });

  it('forgets a declined correction once the words change', async () => {
    const { api, url } = await mountAt('/search?q=atmaga328&exact=1');
    expect(api.state.value.exact).toBe(true);
    api.update({ q: 'atmega328p' });
    await flushPromises();
    expect(url().searchParams.has('exact')).toBe(false);
    expect(url().searchParams.get('q')).toBe('atmega328p');
  });

  it('keeps the page within what the API serves', async () => {
    const { api, url } = await mountAt('/search?q=pin');
    api.setPage(51);
    await flushPromises();
    expect(url().searchParams.get('page')).toBe('50');
  });
});
