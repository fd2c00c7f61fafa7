// @vitest-environment happy-dom
/**
 * The tag page against a fake API: it lists what carries the tag with the counts, links each item
 * to its own page, announces the feed, and a slug that was merged away lands on the surviving tag
 * with a note saying so.
 */
import '../editor/vuetify-env';
import { mount, type VueWrapper } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { createMemoryHistory, createRouter, type Router } from 'vue-router';
import { createVuetify } from 'vuetify';
import TagPage from '@/pages/TagPage.vue';
import { fakeApi, json, settle } from '../errata/fake-api';
import { tagPage } from './fixtures';

const stub = { template: '<div />' };

let wrapper: VueWrapper | null = null;
beforeEach(() => setActivePinia(createPinia()));
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  vi.unstubAllGlobals();
  document.body.innerHTML = '';
  document.head.querySelectorAll('link[rel="alternate"]').forEach((l) => l.remove());
});

async function open(path: string, from?: string): Promise<{ w: VueWrapper; router: Router }> {
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/tags', name: 'tags', component: stub },
      { path: '/tags/:tagSlug', name: 'tag', component: TagPage },
      { path: '/projects/:slug', name: 'project', component: stub },
      { path: '/projects/:slug/errata/:code', name: 'erratum', component: stub },
      { path: '/moderation/tags', name: 'moderation-tags', component: stub },
    ],
  });
  if (from) await router.push(from);
  await router.push(path);
  await router.isReady();
  wrapper = mount(
    { template: '<RouterView />' },
    { global: { plugins: [createVuetify(), router] }, attachTo: document.body },
  );
  await settle();
  return { w: wrapper, router };
}

describe('TagPage', () => {
  it('shows the tag with its counts, aliases and the lessons, errata and projects carrying it, each linked', async () => {
    fakeApi({ 'GET /api/tags/input-only-pin': json(tagPage()) });
    const { w } = await open('/tags/input-only-pin');

    expect(w.get('[data-testid="tag-name"]').text()).toBe('Input-only pin');
    expect(w.get('[data-testid="tag-counts"]').text()).toBe('2 lessons · 1 erratum · 1 project');
    expect(w.get('[data-testid="tag-aliases"]').text()).toBe('Also found as: read-only-gpio');
    expect(w.get('#tag-lessons').text()).toBe('Lessons (2)');

    const lesson = w.get('[data-lesson="42"]');
    expect(lesson.get('a').attributes('href')).toBe('/projects/pond-pump-timer#lesson-42');
    expect(lesson.text()).toContain('tagged “read-only-gpio”');
    expect(w.get('[data-erratum="pond-pump-timer/E3"] a').attributes('href')).toBe(
      '/projects/pond-pump-timer/errata/E3',
    );
    expect(w.get('[data-erratum="pond-pump-timer/E3"]').text()).toContain('Major · Workaround');
    expect(w.get('[data-project="pond-pump-timer"] a').attributes('href')).toBe('/projects/pond-pump-timer');
  });

  it('links the Atom feed on the page and in the document head', async () => {
    fakeApi({ 'GET /api/tags/input-only-pin': json(tagPage()) });
    const { w } = await open('/tags/input-only-pin');
    expect(w.get('[data-testid="tag-feed"]').attributes('href')).toBe('/api/feeds/tags/input-only-pin.atom');
    const head = document.head.querySelector<HTMLLinkElement>('link[rel="alternate"][type="application/atom+xml"]');
    expect(head?.getAttribute('href')).toBe('/api/feeds/tags/input-only-pin.atom');
  });

  it('replaces a merged slug with the surviving tag and says it was merged', async () => {
    const api = fakeApi({
      'GET /api/tags/read-only-gpio': json({ kind: 'redirect', redirectTo: 'input-only-pin', reason: 'merged' }),
      'GET /api/tags/input-only-pin': json(tagPage()),
    });
    const { w, router } = await open('/tags/read-only-gpio', '/tags');

    expect(router.currentRoute.value.fullPath).toBe('/tags/input-only-pin');
    expect(w.get('[data-testid="tag-name"]').text()).toBe('Input-only pin');
    expect(w.get('[data-testid="tag-redirect-note"]').text()).toBe(
      '“read-only-gpio” was merged into “Input-only pin”.',
    );
    expect(api.calls.map((c) => c.url)).toEqual(['/api/tags/read-only-gpio', '/api/tags/input-only-pin']);
    // Replaced, not pushed: going back leaves for the page before, not through the old slug again.
    router.back();
    await settle();
    expect(router.currentRoute.value.fullPath).toBe('/tags');
  });

  it('marks a deprecated tag with its note, and says when a tag does not exist', async () => {
    fakeApi({
      'GET /api/tags/input-only-pin': json(
        tagPage({
          tag: { ...tagPage().tag, state: 'deprecated', description: 'Use “input-only pin” per pin instead.' },
        }),
      ),
    });
    const { w } = await open('/tags/input-only-pin');
    expect(w.get('[data-testid="tag-state"]').text()).toBe('Deprecated');
    expect(w.get('[data-testid="tag-deprecated-note"]').text()).toContain('no longer added to anything new');
    w.unmount();
    wrapper = null;

    fakeApi({});
    const missing = await open('/tags/nothing-here');
    expect(missing.w.get('h1').text()).toBe('No such tag');
  });
});
