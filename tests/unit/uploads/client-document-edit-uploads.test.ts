// @vitest-environment happy-dom
/**
 * Saving a section while a photo uploads: the save waits for the upload, so the revision holds
 * the uploaded image and never the local preview; the draft kept in the browser never holds the
 * preview either.
 */
import '../editor/vuetify-env';
import type { DocumentDetail } from '@shared/contracts/projects';
import { mount, type VueWrapper } from '@vue/test-utils';
import type { Editor } from '@tiptap/vue-3';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { createMemoryHistory, createRouter } from 'vue-router';
import { createVuetify } from 'vuetify';
import { fakeApi, settle, type Call } from '../errata/fake-api';
import { FakeXhr, installFakeXhr } from './client-fake-xhr';
import { anUpload } from './client-fixtures';
import RichEditor from '@/components/editor/RichEditor.vue';
import { configureHttp } from '@/composables/http';
import DocumentEditPage from '@/pages/DocumentEditPage.vue';

const section: DocumentDetail = {
  id: 5,
  kind: 'section',
  title: 'Hardware',
  position: 1,
  loggedOn: null,
  revision: 2,
  html: '<p>The relay board.</p>\n',
  toc: [],
  updatedAt: '2026-03-14T10:00:00.000Z',
  body: 'The relay board.',
  projectSlug: 'kiln-logger',
  projectTitle: 'Kiln Temperature Logger',
  projectStatus: 'draft',
  viewer: { canEdit: true, canOwn: true, canRestore: true },
};

let wrapper: VueWrapper | null = null;
beforeEach(() => {
  setActivePinia(createPinia());
  localStorage.clear();
  configureHttp({ csrfToken: () => 'token', refreshCsrf: async () => {}, onUnauthenticated: () => {} });
  installFakeXhr();
});
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  vi.unstubAllGlobals();
  document.body.innerHTML = '';
});

async function open() {
  const api = fakeApi({
    'GET /api/projects/kiln-logger/documents/5': () => ({ status: 200, body: section }),
    'PUT /api/projects/kiln-logger/documents/5': (call: Call) => ({
      status: 200,
      body: {
        outcome: 'saved',
        mergedWith: null,
        document: { ...section, revision: 3, body: (call.body as { body: string }).body },
      },
    }),
  });
  const stub = { template: '<div />' };
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/projects/:slug/documents/:documentId/edit', name: 'document-edit', component: DocumentEditPage },
      { path: '/projects/:slug/documents/:documentId/history', name: 'document-history', component: stub },
      { path: '/projects/:slug', name: 'project', component: stub },
    ],
  });
  await router.push('/projects/kiln-logger/documents/5/edit');
  wrapper = mount({ template: '<router-view />' }, { global: { plugins: [createVuetify(), router] }, attachTo: document.body });
  await settle();
  const editor = (wrapper.findComponent(RichEditor).vm as unknown as { editor: Editor }).editor;
  return { api, editor };
}

describe('saving while a photo uploads', () => {
  it('waits for the upload and saves the uploaded image, never the local preview', async () => {
    const { api, editor } = await open();
    editor.commands.setTextSelection(editor.state.doc.content.size - 1);
    const data = new DataTransfer();
    data.items.add(new File([new Uint8Array(100)], 'relay.jpg', { type: 'image/jpeg' }));
    editor.view.dom.dispatchEvent(new ClipboardEvent('paste', { clipboardData: data, bubbles: true, cancelable: true }));
    await settle();
    [...document.querySelectorAll('button')].find((b) => b.textContent?.trim() === 'Skip')!.click();
    await settle();

    expect(document.querySelector('[data-testid="uploads-pending"]')!.textContent).toContain('Save waits for them');
    const save = document.querySelector<HTMLButtonElement>('[data-testid="save"]')!;
    expect(save.disabled).toBe(false);
    save.click();
    await settle();
    expect(api.writes()).toEqual([]);
    expect(document.querySelector('[data-testid="uploads-pending"]')!.textContent).toContain('Saving as soon as');

    FakeXhr.last.respond(201, { items: [anUpload({ id: 12 })] });
    await settle();
    await settle();
    const saves = api.writes().filter((c) => c.method === 'PUT');
    expect(saves).toHaveLength(1);
    expect((saves[0]!.body as { body: string }).body).toBe('The relay board.\n\n![](/api/uploads/12/page.webp)');
    expect(document.querySelector('[data-testid="uploads-pending"]')).toBeNull();
  });

  it('keeps the local preview out of the draft kept in this browser', async () => {
    const { editor } = await open();
    editor.commands.setTextSelection(editor.state.doc.content.size - 1);
    editor.commands.insertContent(' Typed meanwhile.');
    const data = new DataTransfer();
    data.items.add(new File([new Uint8Array(100)], 'relay.jpg', { type: 'image/jpeg' }));
    editor.view.dom.dispatchEvent(new ClipboardEvent('paste', { clipboardData: data, bubbles: true, cancelable: true }));
    await new Promise((resolve) => setTimeout(resolve, 800));
    const stored = Object.values({ ...localStorage }).join('\n');
    expect(stored).toContain('Typed meanwhile.');
    expect(stored).not.toContain('blob:');
  });
});
