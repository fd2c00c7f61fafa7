// @vitest-environment happy-dom
/**
 * The gallery: readers see the photos (responsive, lazy, with their shape reserved) and download
 * the files; editors also describe photos in place, choose the cover photo, delete what nothing
 * uses, add files with progress, and see the storage used.
 */
import '../editor/vuetify-env';
import type { ProjectDetail } from '@shared/contracts/projects';
import type { Upload } from '@shared/contracts/uploads';
import { mount, type VueWrapper } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { nextTick } from 'vue';
import { createMemoryHistory, createRouter } from 'vue-router';
import { createVuetify } from 'vuetify';
import { fakeApi, json, settle } from '../errata/fake-api';
import { FakeXhr, installFakeXhr } from './client-fake-xhr';
import { anUpload, aProject } from './client-fixtures';
import { configureHttp } from '@/composables/http';
import ProjectGalleryPage from '@/pages/ProjectGalleryPage.vue';

const relay = anUpload({
  id: 12,
  name: 'relay.jpg',
  altText: 'Relay board with the bodge wire',
  caption: 'Rev A, top side',
  referenced: true,
});
const scope = anUpload({ id: 13, name: 'scope.png', mime: 'image/png', width: 800, height: 600, referenced: false });
const gerbers = anUpload({
  id: 14,
  kind: 'attachment',
  mime: 'application/zip',
  name: 'gerbers-rev-a.zip',
  bytes: 184_000,
  width: null,
  height: null,
  variants: [],
  url: '/api/uploads/14/original.zip',
  markdownUrl: '/api/uploads/14/original.zip',
  srcset: null,
  sizes: null,
  entries: [
    { name: 'kiln-logger-F_Cu.gbr', bytes: 120_000, compressedBytes: 30_000 },
    { name: 'kiln-logger.drl', bytes: 4_000, compressedBytes: 1_000 },
  ],
});
const schematic = anUpload({
  id: 15,
  kind: 'attachment',
  mime: 'application/pdf',
  name: 'schematic.pdf',
  bytes: 2_400_000,
  width: null,
  height: null,
  variants: [],
  url: '/api/uploads/15/original.pdf',
  markdownUrl: '/api/uploads/15/original.pdf',
  srcset: null,
  sizes: null,
});

const coverOf = (upload: Upload) => ({
  url: upload.markdownUrl,
  srcset: upload.srcset!,
  sizes: upload.sizes!,
  width: upload.width!,
  height: upload.height!,
  altText: upload.altText,
});

let wrapper: VueWrapper | null = null;
let items: Upload[];
let project: ProjectDetail;

beforeEach(() => {
  setActivePinia(createPinia());
  configureHttp({ csrfToken: () => 'token', refreshCsrf: async () => {}, onUnauthenticated: () => {} });
  installFakeXhr();
  items = [relay, scope, gerbers, schematic];
  project = aProject({ cover: coverOf(relay) } as Partial<ProjectDetail>);
});
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  vi.unstubAllGlobals();
  document.body.innerHTML = '';
});

function serve(viewer = { canEdit: true, canOwn: true, canRestore: true }) {
  return fakeApi({
    'GET /api/projects/kiln-logger': () => ({ status: 200, body: { ...project, viewer } }),
    'GET /api/projects/kiln-logger/uploads': () => ({
      status: 200,
      body: { items, quota: { usedBytes: 12_400_000, limitBytes: 500_000_000 } },
    }),
    'PATCH /api/uploads/13': (call) => ({ status: 200, body: { ...scope, ...(call.body as object) } }),
    'PUT /api/projects/kiln-logger/cover': (call) => {
      const id = (call.body as { uploadId: number | null }).uploadId;
      project = { ...project, cover: id ? coverOf(items.find((u) => u.id === id)!) : null } as ProjectDetail;
      return { status: 200, body: project };
    },
    'DELETE /api/uploads/13': () => {
      items = items.filter((u) => u.id !== 13);
      return { status: 204 };
    },
  });
}

async function open() {
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/projects/:slug', name: 'project', component: { template: '<div />' } },
      { path: '/projects/:slug/gallery', name: 'project-gallery', component: ProjectGalleryPage },
      { path: '/', name: 'home', component: { template: '<div />' } },
    ],
  });
  await router.push('/projects/kiln-logger/gallery');
  wrapper = mount({ template: '<router-view />' }, { global: { plugins: [createVuetify(), router] }, attachTo: document.body });
  await settle();
  await settle();
}

const card = (id: number) => document.querySelector<HTMLElement>(`[data-upload-id="${id}"]`)!;
const buttonIn = (root: ParentNode, name: string) =>
  [...root.querySelectorAll<HTMLButtonElement>('button')].find(
    (b) => b.getAttribute('aria-label') === name || b.textContent?.trim() === name,
  );

describe('the gallery', () => {
  it('shows readers each photo with srcset, sizes, its shape, alt text and lazy loading', async () => {
    serve({ canEdit: false, canOwn: false, canRestore: false });
    await open();
    const img = card(12).querySelector('img')!;
    expect(img.getAttribute('srcset')).toBe(relay.srcset);
    expect(img.getAttribute('sizes')).toBeTruthy();
    expect(img.getAttribute('width')).toBe('1600');
    expect(img.getAttribute('height')).toBe('1200');
    expect(img.getAttribute('alt')).toBe('Relay board with the bodge wire');
    expect(img.getAttribute('loading')).toBe('lazy');
    expect(img.getAttribute('src')).toBe('/api/uploads/12/thumb.webp');
    expect(card(12).textContent).toContain('Rev A, top side');
    expect(card(12).textContent).toContain('Cover photo');
    // Nothing to change, and no storage figures, for readers.
    expect(buttonIn(document, 'Delete relay.jpg')).toBeUndefined();
    expect(document.querySelector('[data-testid="upload-drop-zone"]')).toBeNull();
    expect(document.querySelector('[data-testid="gallery-quota"]')).toBeNull();
  });

  it('lists the files with type, size and a download link, and what a ZIP holds', async () => {
    serve({ canEdit: false, canOwn: false, canRestore: false });
    await open();
    const zip = card(14);
    expect(zip.textContent).toContain('ZIP archive · 184 kB');
    expect(zip.querySelector('a[download]')!.getAttribute('href')).toBe('/api/uploads/14/original.zip');
    expect(zip.querySelector('summary')!.textContent).toContain('2 files inside');
    expect([...zip.querySelectorAll('tbody td:first-child')].map((td) => td.textContent)).toEqual([
      'kiln-logger-F_Cu.gbr',
      'kiln-logger.drl',
    ]);
    expect(card(15).textContent).toContain('PDF · 2.4 MB');
    expect(card(15).querySelector('summary')).toBeNull();
  });

  it('opens the viewer with the full image, caption and alt text, and steps to the next photo', async () => {
    serve();
    await open();
    buttonIn(card(12), 'View Relay board with the bodge wire')!.click();
    await settle();
    const viewer = () => document.querySelector<HTMLElement>('[data-testid="upload-viewer"]')!;
    expect(viewer().querySelector('figcaption')!.textContent).toBe('Rev A, top side');
    expect(viewer().querySelector('img')!.getAttribute('alt')).toBe('Relay board with the bodge wire');
    expect(viewer().textContent).toContain('1600 × 1200 pixels');
    expect(buttonIn(viewer(), 'Previous photo')!.disabled).toBe(true);
    buttonIn(viewer(), 'Next photo')!.click();
    await settle();
    expect(viewer().textContent).toContain('scope.png');
    expect(viewer().textContent).toContain('None yet');
    expect(buttonIn(viewer(), 'Next photo')!.disabled).toBe(true);
  });

  it('shows editors the storage used, and keeps photos in use from being deleted', async () => {
    serve();
    await open();
    expect(document.querySelector('[data-testid="gallery-quota"]')!.textContent).toContain(
      "12.4 MB of 500 MB used by this project's files",
    );
    expect(buttonIn(card(12), 'Delete relay.jpg')!.disabled).toBe(true);
    expect(card(12).textContent).toContain('In use, so it cannot be deleted.');
    expect(buttonIn(card(13), 'Delete scope.png')!.disabled).toBe(false);
    expect(card(13).textContent).toContain('No alt text yet');
  });

  it('lets editors describe a photo in place', async () => {
    const api = serve();
    await open();
    buttonIn(card(13), 'Edit the description of scope.png')!.click();
    await settle();
    const [alt, caption] = [...card(13).querySelectorAll<HTMLInputElement>('input')];
    alt!.value = '  Ripple on the 3.3 V rail at 400 mA ';
    alt!.dispatchEvent(new Event('input'));
    caption!.value = 'Before the bigger inductor';
    caption!.dispatchEvent(new Event('input'));
    await nextTick();
    card(13).querySelector('form')!.dispatchEvent(new Event('submit'));
    await settle();
    expect(api.writes()).toEqual([
      {
        method: 'PATCH',
        url: '/api/uploads/13',
        body: { altText: 'Ripple on the 3.3 V rail at 400 mA', caption: 'Before the bigger inductor' },
      },
    ]);
    expect(card(13).textContent).toContain('Ripple on the 3.3 V rail at 400 mA');
    expect(card(13).textContent).not.toContain('No alt text yet');
  });

  it('makes another photo the cover', async () => {
    const api = serve();
    await open();
    buttonIn(card(13), 'Use scope.png as the cover photo')!.click();
    await settle();
    expect(api.writes()).toEqual([{ method: 'PUT', url: '/api/projects/kiln-logger/cover', body: { uploadId: 13 } }]);
    expect(card(13).textContent).toContain('Cover photo');
    expect(card(12).textContent).not.toContain('Cover photo');
  });

  it('deletes an unused photo after asking', async () => {
    const api = serve();
    await open();
    buttonIn(card(13), 'Delete scope.png')!.click();
    await settle();
    expect(api.writes()).toEqual([]);
    document.querySelector<HTMLButtonElement>('[data-testid="confirm-delete-upload"]')!.click();
    await settle();
    expect(api.writes()).toEqual([{ method: 'DELETE', url: '/api/uploads/13', body: undefined }]);
    expect(document.querySelector('[data-upload-id="13"]')).toBeNull();
  });

  it('adds dropped files with a progress bar each, then shows them', async () => {
    serve();
    await open();
    const zone = document.querySelector<HTMLElement>('[data-testid="upload-drop-zone"]')!;
    const data = new DataTransfer();
    data.items.add(new File([new Uint8Array(1000)], 'bench.jpg', { type: 'image/jpeg' }));
    const drop = new Event('drop', { bubbles: true, cancelable: true });
    Object.defineProperty(drop, 'dataTransfer', { value: data });
    zone.dispatchEvent(drop);
    await settle();
    expect(FakeXhr.last.url).toBe('/api/projects/kiln-logger/uploads');
    FakeXhr.last.progress(250, 1000);
    await nextTick();
    const bar = document.querySelector('[role="progressbar"][aria-label="Uploading bench.jpg"]')!;
    expect(bar.getAttribute('aria-valuenow')).toBe('25');

    const bench = anUpload({ id: 16, name: 'bench.jpg' });
    items = [...items, bench];
    FakeXhr.last.respond(201, { items: [bench] });
    await settle();
    await settle();
    expect(document.querySelector('[role="progressbar"][aria-label="Uploading bench.jpg"]')).toBeNull();
    expect(card(16)).not.toBeNull();
  });

  it('says so when the project cannot be seen', async () => {
    fakeApi({ 'GET /api/projects/kiln-logger': json({ error: { code: 'not_found', message: 'No such project' } }, 404) });
    await open();
    expect(document.querySelector('[data-testid="gallery-missing"]')).not.toBeNull();
  });
});
