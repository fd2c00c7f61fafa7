// @vitest-environment happy-dom
/**
 * The propose pages send a proposal based on the revision they opened and then show it; an editor
 * of the project is told to edit directly instead.
 */
import '../editor/vuetify-env';
import type { DocumentDetail } from '@shared/contracts/projects';
import { flushPromises, mount, type VueWrapper } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { defineComponent, h } from 'vue';
import { createMemoryHistory, createRouter, RouterView } from 'vue-router';
import { createVuetify } from 'vuetify';
import ProposeDocumentEditPage from '@/pages/ProposeDocumentEditPage.vue';
import { useSessionStore } from '@/stores/session';
import { fakeServer, ok, people, signedInAs } from './fake-server';

const section: DocumentDetail = {
  id: 7,
  kind: 'section',
  title: 'Power',
  position: 2,
  loggedOn: null,
  revision: 4,
  html: '<p>The regulator is an LDO.</p>',
  toc: [],
  updatedAt: '2026-03-01T10:00:00.000Z',
  body: 'The regulator is an LDO.\n',
  projectSlug: 'greenhouse-vent',
  projectTitle: 'Greenhouse vent controller',
  projectStatus: 'published',
  viewer: { canEdit: false, canOwn: false, canRestore: false },
};

const DOC = '/api/projects/greenhouse-vent/documents/7';
const Stub = defineComponent({ render: () => h('p', 'elsewhere') });

let wrapper: VueWrapper | null = null;
beforeEach(() => {
  setActivePinia(createPinia());
  useSessionStore().user = signedInAs(people.contributor);
  localStorage.clear();
});
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  document.body.innerHTML = '';
  vi.unstubAllGlobals();
});

async function openPage() {
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      {
        path: '/projects/:slug/documents/:documentId/propose',
        name: 'proposal-edit-document',
        component: ProposeDocumentEditPage,
      },
      { path: '/proposals/:proposalId', name: 'proposal', component: Stub },
      { path: '/projects/:slug', name: 'project', component: Stub },
      { path: '/projects/:slug/log/:documentId', name: 'log-entry', component: Stub },
      { path: '/projects/:slug/documents/:documentId/edit', name: 'document-edit', component: Stub },
    ],
  });
  await router.push('/projects/greenhouse-vent/documents/7/propose');
  wrapper = mount(RouterView, { global: { plugins: [router, createVuetify()] }, attachTo: document.body });
  await flushPromises();
  return { wrapper, router };
}

describe('ProposeDocumentEditPage', () => {
  it('says what happens to a proposal before anyone writes one', async () => {
    fakeServer({ [`GET ${DOC}`]: ok(section) });
    const { wrapper } = await openPage();
    expect(wrapper.text()).toContain('becomes a revision credited to you');
    expect(wrapper.text()).toContain('notification when it is decided');
  });

  it('sends the changed text based on the revision it opened, then shows the proposal', async () => {
    const server = fakeServer({
      [`GET ${DOC}`]: ok(section),
      'POST /api/projects/greenhouse-vent/proposals': ok({ id: 31 }, 201),
    });
    const { wrapper, router } = await openPage();
    await wrapper.get('input[name="title"]').setValue('Power supply');
    await wrapper.get('input[name="message"]').setValue('The section title was vague');
    await wrapper.get('form').trigger('submit');
    await flushPromises();

    expect(server.writes()).toEqual([
      {
        method: 'POST',
        url: '/api/projects/greenhouse-vent/proposals',
        body: {
          kind: 'document_edit',
          documentId: 7,
          baseRevision: 4,
          payload: { title: 'Power supply', body: 'The regulator is an LDO.\n', loggedOn: null },
          message: 'The section title was vague',
        },
      },
    ]);
    await vi.waitFor(() => expect(router.currentRoute.value.fullPath).toBe('/proposals/31'));
  });

  it('sends nothing while nothing is changed', async () => {
    const server = fakeServer({ [`GET ${DOC}`]: ok(section) });
    const { wrapper } = await openPage();
    await wrapper.get('form').trigger('submit');
    await flushPromises();
    expect(server.writes()).toHaveLength(0);
    expect(wrapper.get('[data-testid="form-error"]').text()).toContain('Nothing is changed yet');
  });

  it('tells an editor of the project to edit directly', async () => {
    fakeServer({ [`GET ${DOC}`]: ok({ ...section, viewer: { canEdit: true, canOwn: false, canRestore: false } }) });
    const { wrapper } = await openPage();
    expect(wrapper.find('[data-testid="editor-notice"]').exists()).toBe(true);
    expect(wrapper.find('form').exists()).toBe(false);
  });
});
