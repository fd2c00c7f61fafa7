// @vitest-environment happy-dom
/**
 * Publishing a build whose photos lack alt text: the refusal becomes a gentle dialog listing the
 * photos (thumbnail, where each is used) with a field each; the descriptions are saved on the
 * uploads and the build is published again. The project page also links the gallery and shows
 * the cover photo with its shape reserved.
 */
import '../editor/vuetify-env';
import type { ProjectDetail } from '@shared/contracts/projects';
import { mount, type VueWrapper } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { nextTick } from 'vue';
import { createMemoryHistory, createRouter } from 'vue-router';
import { createVuetify } from 'vuetify';
import { fakeApi, settle, type Call } from '../errata/fake-api';
import { anUpload, aProject } from './client-fixtures';
import { configureHttp } from '@/composables/http';
import ProjectPage from '@/pages/ProjectPage.vue';

const missing = {
  images: [
    { uploadId: 7, name: 'scope.png', thumbUrl: '/api/uploads/7/thumb.webp', usedIn: 'Hardware' },
    { uploadId: 9, name: 'bodge.jpg', thumbUrl: null, usedIn: 'Log entry “Rev A bring-up”' },
  ],
};

let wrapper: VueWrapper | null = null;
let publishCalls = 0;

beforeEach(() => {
  setActivePinia(createPinia());
  configureHttp({ csrfToken: () => 'token', refreshCsrf: async () => {}, onUnauthenticated: () => {} });
  publishCalls = 0;
});
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  vi.unstubAllGlobals();
  document.body.innerHTML = '';
});

function serve(project: ProjectDetail = aProject()) {
  return fakeApi({
    'GET /api/projects/kiln-logger': () => ({ status: 200, body: project }),
    'POST /api/projects/kiln-logger/publish': () => {
      publishCalls++;
      return publishCalls === 1
        ? {
            status: 400,
            body: { error: { code: 'validation_failed', message: 'Some photos have no alt text.', details: missing } },
          }
        : { status: 200, body: { ...project, status: 'published' } };
    },
    'PATCH /api/uploads/7': (call: Call) => ({ status: 200, body: anUpload({ id: 7, ...(call.body as object) }) }),
    'PATCH /api/uploads/9': (call: Call) => ({ status: 200, body: anUpload({ id: 9, ...(call.body as object) }) }),
  });
}

async function open() {
  const stub = { template: '<div />' };
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/projects/:slug', name: 'project', component: ProjectPage },
      { path: '/projects/:slug/gallery', name: 'project-gallery', component: stub },
      { path: '/projects/:slug/pin-maps', name: 'project-pin-maps', component: stub },
      { path: '/projects/:slug/memory', name: 'project-memory', component: stub },
      { path: '/tags/:tagSlug', name: 'tag', component: stub },
      { path: '/projects/:slug/history', name: 'project-history', component: stub },
      { path: '/projects/:slug/settings', name: 'project-settings', component: stub },
      { path: '/', name: 'home', component: stub },
    ],
  });
  await router.push('/projects/kiln-logger');
  wrapper = mount(
    { template: '<router-view />' },
    {
      global: {
        plugins: [createVuetify(), router],
        stubs: { ProjectErrataSummary: true, ProjectLessons: true, ProjectFollowButton: true },
      },
      attachTo: document.body,
    },
  );
  await settle();
  return router;
}

const dialog = () => document.querySelector<HTMLElement>('[data-testid="missing-alt-dialog"]');

async function publish() {
  document.querySelector<HTMLButtonElement>('[data-testid="toggle-published"]')!.click();
  await settle();
}

describe('publishing with photos that lack alt text', () => {
  it('lists the photos with where they are used, and publishes once each is described', async () => {
    const api = serve();
    await open();
    await publish();

    expect(dialog()!.textContent).toContain('2 photos need a description');
    const items = [...dialog()!.querySelectorAll('li')];
    expect(items[0]!.textContent).toContain('scope.png · used in Hardware');
    expect(items[0]!.querySelector('img')!.getAttribute('src')).toBe('/api/uploads/7/thumb.webp');
    expect(items[1]!.textContent).toContain('used in Log entry “Rev A bring-up”');
    expect(items[1]!.querySelector('img')).toBeNull();

    const inputs = [...dialog()!.querySelectorAll<HTMLInputElement>('input')];
    inputs[0]!.value = 'Ripple on the 3.3 V rail';
    inputs[0]!.dispatchEvent(new Event('input'));
    inputs[1]!.value = 'Bodge wire from D7 to the relay input';
    inputs[1]!.dispatchEvent(new Event('input'));
    await nextTick();
    dialog()!.querySelector('form')!.dispatchEvent(new Event('submit'));
    await settle();

    expect(api.writes().map((c) => [c.method, c.url, c.body])).toEqual([
      ['POST', '/api/projects/kiln-logger/publish', undefined],
      ['PATCH', '/api/uploads/7', { altText: 'Ripple on the 3.3 V rail' }],
      ['PATCH', '/api/uploads/9', { altText: 'Bodge wire from D7 to the relay input' }],
      ['POST', '/api/projects/kiln-logger/publish', undefined],
    ]);
    expect(dialog()).toBeNull();
    expect(document.querySelector('[data-testid="toggle-published"]')!.textContent).toContain('Unpublish');
  });

  it('asks again for a photo left empty, and sends nothing until each has a description', async () => {
    const api = serve();
    await open();
    await publish();
    const inputs = [...dialog()!.querySelectorAll<HTMLInputElement>('input')];
    inputs[0]!.value = 'Ripple on the 3.3 V rail';
    inputs[0]!.dispatchEvent(new Event('input'));
    await nextTick();
    dialog()!.querySelector('form')!.dispatchEvent(new Event('submit'));
    await settle();
    expect(dialog()!.textContent).toContain('Describe this photo, in a few words.');
    expect(api.writes()).toHaveLength(1); // the first publish only
  });

  it('"Not now" leaves the build a draft', async () => {
    const api = serve();
    await open();
    await publish();
    [...dialog()!.querySelectorAll('button')].find((b) => b.textContent?.trim() === 'Not now')!.click();
    await settle();
    expect(dialog()).toBeNull();
    expect(api.writes()).toHaveLength(1);
    expect(document.querySelector('[data-testid="toggle-published"]')!.textContent).toContain('Publish');
  });
});

describe('the project page', () => {
  it('links the gallery from the meta row', async () => {
    serve();
    const router = await open();
    const link = document.querySelector<HTMLAnchorElement>('[data-testid="gallery-link"]')!;
    expect(link.textContent).toContain('Photos and files');
    expect(link.getAttribute('href')).toBe(router.resolve({ name: 'project-gallery', params: { slug: 'kiln-logger' } }).href);
  });

  it('shows the cover photo with its size, so the header does not move when it loads', async () => {
    const relay = anUpload({ id: 12, altText: 'Relay board with the bodge wire' });
    serve(
      aProject({
        cover: {
          url: relay.markdownUrl,
          srcset: relay.srcset!,
          sizes: relay.sizes!,
          width: 1400,
          height: 1050,
          altText: relay.altText,
        },
      } as Partial<ProjectDetail>),
    );
    await open();
    const cover = document.querySelector<HTMLImageElement>('[data-testid="project-cover"]')!;
    expect(cover.getAttribute('src')).toBe('/api/uploads/12/page.webp');
    expect(cover.getAttribute('srcset')).toBe(relay.srcset);
    expect(cover.getAttribute('width')).toBe('1400');
    expect(cover.getAttribute('height')).toBe('1050');
    expect(cover.getAttribute('alt')).toBe('Relay board with the bodge wire');
  });

  it('has no cover image when the project has none', async () => {
    serve();
    await open();
    expect(document.querySelector('[data-testid="project-cover"]')).toBeNull();
  });
});
