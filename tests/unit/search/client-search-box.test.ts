// @vitest-environment happy-dom
/**
 * The top bar's search as a reader works it with the keyboard (the WAI-ARIA combobox pattern):
 * results open as they type, ArrowDown/ArrowUp move through them while focus stays in the field,
 * Enter opens the highlighted hit or else the search page, Escape closes, `/` jumps to the field.
 * The API is a fake answering hand-written results shaped like the demo data.
 */
import '../editor/vuetify-env';
import type { SearchHit, SearchQueryInput, SearchResult } from '@shared/contracts/search';
import { flushPromises, mount, type VueWrapper } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { defineComponent, h } from 'vue';
import { createMemoryHistory, createRouter } from 'vue-router';
import { createVuetify } from 'vuetify';
import TheSearchBox from '@/components/search/TheSearchBox.vue';
import { searchApi } from '@/composables/search';

let nextId = 1;
function hit(partial: Partial<SearchHit> & Pick<SearchHit, 'kind' | 'title' | 'url'>): SearchHit {
  return {
    id: nextId++,
    titleHtml: partial.title,
    snippetHtml: '',
    project: { slug: 'greenhouse-vent-controller', title: 'Greenhouse vent controller' },
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

function answer(query: string, items: SearchHit[], extra: Partial<SearchResult> = {}): SearchResult {
  return {
    query,
    correctedQuery: null,
    suggestions: [],
    total: { value: items.length, exact: true },
    page: 1,
    pageSize: 8,
    items,
    facets: { kind: [], category: [], severity: [], status: [], tag: [], part: [], project: [] },
    facetsApproximate: false,
    backend: 'postgres',
    ...extra,
  };
}

/** Ranked as the server ranks "analog only pin": a lesson first, the erratum second. */
const analogOnlyPin = answer(
  'analog only pin',
  [
    hit({
      kind: 'lesson',
      title: 'Check the pin table before routing: A6 and A7 on the Nano-style board cannot drive anything.',
      url: '/projects/greenhouse-vent-controller#lessons',
    }),
    hit({
      kind: 'erratum',
      title: 'E1 Relay never switches: A6 is analog input only',
      titleHtml: 'E1 Relay never switches: A6 is <mark>analog</mark> input only',
      snippetHtml: 'whatever the firmware writes to the relay <mark>pin</mark>',
      url: '/projects/greenhouse-vent-controller/errata/E1',
      severity: 'critical',
      status: 'fixed_later',
    }),
    hit({
      kind: 'log_entry',
      title: 'Rev A assembled — the fan relay never clicks',
      url: '/projects/greenhouse-vent-controller/log/7',
    }),
    hit({
      kind: 'erratum',
      title: 'E4 Vent position lost after a reset',
      url: '/projects/greenhouse-vent-controller/errata/E4',
      severity: 'minor',
      status: 'workaround',
    }),
    hit({ kind: 'section', title: 'Postmortem', url: '/projects/greenhouse-vent-controller#section-4' }),
  ],
  { total: { value: 32, exact: true } },
);

const gpio35 = answer('GPIO35', [
  hit({
    kind: 'erratum',
    title: 'E1 LED ring stays dark: GPIO35 is input only',
    url: '/projects/tide-clock/errata/E1',
    project: { slug: 'tide-clock', title: 'Tide clock' },
    severity: 'major',
  }),
]);

const Page = defineComponent({ render: () => h('p', 'page') });

let wrapper: VueWrapper | null = null;
let calls: { params: SearchQueryInput; signal: AbortSignal | undefined }[] = [];
let answers: Record<string, SearchResult> = {};

beforeEach(() => {
  setActivePinia(createPinia());
  vi.useFakeTimers({ toFake: ['setTimeout', 'clearTimeout'] });
  calls = [];
  answers = { 'analog only pin': analogOnlyPin, GPIO35: gpio35 };
  vi.spyOn(searchApi, 'search').mockImplementation(async (params, options = {}) => {
    calls.push({ params, signal: options.signal });
    return answers[params.q ?? ''] ?? answer(params.q ?? '', []);
  });
});
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  document.body.innerHTML = '';
  vi.useRealTimers();
  vi.restoreAllMocks();
});

async function mountBox() {
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/', name: 'home', component: Page },
      { path: '/search', name: 'search', component: Page },
      { path: '/:rest(.*)*', name: 'elsewhere', component: Page },
    ],
  });
  await router.push('/');
  wrapper = mount(TheSearchBox, { global: { plugins: [router, createVuetify()] }, attachTo: document.body });
  await flushPromises();
  return { router, input: wrapper.get<HTMLInputElement>('input[role="combobox"]') };
}

type Input = Awaited<ReturnType<typeof mountBox>>['input'];

/** Types into the field and lets the pause pass and the answer arrive. */
async function type(input: Input, text: string) {
  input.element.focus();
  await input.setValue(text);
  await vi.advanceTimersByTimeAsync(200);
  await flushPromises();
}

async function press(input: Input, key: string) {
  await input.trigger('keydown', { key });
  await flushPromises();
}

const listbox = () => document.querySelector('[role="listbox"]') as HTMLElement;
const options = () => [...document.querySelectorAll<HTMLElement>('[role="option"]')];
const optionTitles = () => options().map((o) => o.querySelector('.the-search-box__title')!.textContent!.trim());
const activeOption = (input: Input) => {
  const id = input.attributes('aria-activedescendant');
  return id ? document.getElementById(id) : null;
};

describe('TheSearchBox', () => {
  it('is a labelled combobox that controls its listbox, collapsed until there is something to show', async () => {
    const { input } = await mountBox();
    expect(input.attributes('aria-expanded')).toBe('false');
    expect(input.attributes('aria-autocomplete')).toBe('list');
    expect(input.attributes('aria-controls')).toBe(listbox().id);
    expect(document.querySelector(`label[for="${input.element.id}"]`)?.textContent).toContain('Search known mistakes');
    expect(input.attributes('aria-activedescendant')).toBeUndefined();
    // The count of results is announced through a status region the field points to.
    expect(document.getElementById(input.attributes('aria-describedby')!)?.getAttribute('role')).toBe('status');
  });

  it('opens the results after the reader pauses, errata first, labelled by kind', async () => {
    const { input } = await mountBox();
    input.element.focus();
    await input.setValue('analog only pin');
    await vi.advanceTimersByTimeAsync(150);
    expect(calls).toEqual([]);
    await vi.advanceTimersByTimeAsync(50);
    await flushPromises();
    expect(calls.map((c) => c.params)).toEqual([{ q: 'analog only pin', pageSize: 8 }]);
    expect(input.attributes('aria-expanded')).toBe('true');
    expect(optionTitles()).toEqual([
      'E1 Relay never switches: A6 is analog input only',
      'E4 Vent position lost after a reset',
      'Check the pin table before routing: A6 and A7 on the Nano-style board cannot drive anything.',
      'Postmortem',
      'Rev A assembled — the fan relay never clicks',
    ]);
    const groups = [...listbox().querySelectorAll('[role="group"]')].map((g) =>
      document.getElementById(g.getAttribute('aria-labelledby')!)!.textContent!.trim(),
    );
    expect(groups).toEqual(['Errata', 'Lessons', 'Write-up sections', 'Log entries']);
    // The matched word is marked, and the snippet stays one line of text.
    expect(options()[0]!.querySelector('mark')?.textContent).toBe('analog');
    expect(options()[0]!.textContent).toContain('Greenhouse vent controller');
    expect(document.getElementById(input.attributes('aria-describedby')!)?.textContent).toBe(
      '5 of 32 results. Up and down arrows choose one, Enter opens it.',
    );
  });

  it('moves the highlight with ArrowDown and ArrowUp while focus stays in the field, wrapping at the ends', async () => {
    const { input } = await mountBox();
    await type(input, 'analog only pin');
    await press(input, 'ArrowDown');
    expect(activeOption(input)?.textContent).toContain('E1 Relay never switches');
    expect(activeOption(input)?.getAttribute('aria-selected')).toBe('true');
    await press(input, 'ArrowDown');
    expect(activeOption(input)?.textContent).toContain('E4 Vent position lost');
    expect(options().filter((o) => o.getAttribute('aria-selected') === 'true')).toHaveLength(1);
    await press(input, 'ArrowUp');
    await press(input, 'ArrowUp');
    expect(activeOption(input)?.textContent).toContain('Rev A assembled');
    await press(input, 'ArrowDown');
    expect(activeOption(input)?.textContent).toContain('E1 Relay never switches');
    expect(document.activeElement).toBe(input.element);
  });

  it('opens the highlighted hit on Enter: from a pin label to the erratum in one step', async () => {
    const { router, input } = await mountBox();
    await type(input, 'GPIO35');
    await press(input, 'ArrowDown');
    await press(input, 'Enter');
    await flushPromises();
    expect(router.currentRoute.value.fullPath).toBe('/projects/tide-clock/errata/E1');
    expect(input.attributes('aria-expanded')).toBe('false');
  });

  it('keeps the fragment of a hit that points into a page', async () => {
    const { router, input } = await mountBox();
    await type(input, 'analog only pin');
    for (let i = 0; i < 3; i++) await press(input, 'ArrowDown');
    await press(input, 'Enter');
    await flushPromises();
    expect(router.currentRoute.value.path).toBe('/projects/greenhouse-vent-controller');
    expect(router.currentRoute.value.hash).toBe('#lessons');
  });

  it('opens the search page for the words on Enter when no hit is highlighted', async () => {
    const { router, input } = await mountBox();
    await type(input, 'analog only pin');
    await press(input, 'Enter');
    await flushPromises();
    expect(router.currentRoute.value.name).toBe('search');
    expect(router.currentRoute.value.query).toEqual({ q: 'analog only pin' });
  });

  it('closes on Escape without losing the words, and clears them on a second Escape', async () => {
    const { input } = await mountBox();
    await type(input, 'analog only pin');
    await press(input, 'ArrowDown');
    await press(input, 'Escape');
    expect(input.attributes('aria-expanded')).toBe('false');
    expect(input.attributes('aria-activedescendant')).toBeUndefined();
    expect(input.element.value).toBe('analog only pin');
    // ArrowDown opens the list again.
    await press(input, 'ArrowDown');
    expect(input.attributes('aria-expanded')).toBe('true');
    await press(input, 'Escape');
    await press(input, 'Escape');
    expect(input.element.value).toBe('');
  });

  it('starts over when the words change: the highlight goes, the new answer shows', async () => {
    const { input } = await mountBox();
    await type(input, 'analog only pin');
    await press(input, 'ArrowDown');
    await type(input, 'GPIO35');
    expect(input.attributes('aria-activedescendant')).toBeUndefined();
    expect(optionTitles()).toEqual(['E1 LED ring stays dark: GPIO35 is input only']);
  });

  it('aborts the request for words the reader has typed past', async () => {
    const { input } = await mountBox();
    let release!: () => void;
    vi.mocked(searchApi.search).mockImplementationOnce((params, options = {}) => {
      calls.push({ params, signal: options.signal });
      return new Promise((resolve) => {
        release = () => resolve(answer('GPIO3', [hit({ kind: 'part', title: 'Stale part', url: '/parts/x' })]));
      });
    });
    await type(input, 'GPIO3');
    await type(input, 'GPIO35');
    expect(calls.map((c) => c.params.q)).toEqual(['GPIO3', 'GPIO35']);
    expect(calls[0]!.signal?.aborted).toBe(true);
    release();
    await flushPromises();
    expect(optionTitles()).toEqual(['E1 LED ring stays dark: GPIO35 is input only']);
  });

  it('asks for known mistakes only when the toggle is on', async () => {
    const { input } = await mountBox();
    await type(input, 'analog only pin');
    const toggle = wrapper!.get('[data-testid="search-box-mistakes"] input');
    await toggle.setValue(true);
    await flushPromises();
    expect(calls.at(-1)!.params).toEqual({ q: 'analog only pin', pageSize: 8, mistakes: '1' });
    // "See all results" carries the toggle to the search page.
    expect(wrapper!.get('[data-testid="search-box-all"]').attributes('href')).toBe(
      '/search?q=analog+only+pin&mistakes=1',
    );
  });

  it('does not search for a single letter', async () => {
    const { input } = await mountBox();
    await type(input, 'a');
    expect(calls).toEqual([]);
    expect(input.attributes('aria-expanded')).toBe('false');
  });

  it('jumps to the field on "/" from the page, but not while the reader types elsewhere', async () => {
    const { input } = await mountBox();
    const other = document.createElement('textarea');
    document.body.append(other);
    other.focus();
    other.dispatchEvent(new KeyboardEvent('keydown', { key: '/', bubbles: true, cancelable: true }));
    expect(document.activeElement).toBe(other);

    other.blur();
    const event = new KeyboardEvent('keydown', { key: '/', bubbles: true, cancelable: true });
    document.body.dispatchEvent(event);
    expect(document.activeElement).toBe(input.element);
    expect(event.defaultPrevented).toBe(true);
  });
});
