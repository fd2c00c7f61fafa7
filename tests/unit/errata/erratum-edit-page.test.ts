// @vitest-environment happy-dom
/**
 * Recording and editing an erratum: the form is checked with the shared schema before anything is
 * sent, a new erratum is sent with its tags, an edit is saved on top of the revision it started
 * from, and readers who may not edit are pointed to a proposal instead.
 */
import '../editor/vuetify-env';
import type { ErratumDetail } from '@shared/contracts/errata';
import { mount, type VueWrapper } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { nextTick } from 'vue';
import { createMemoryHistory, createRouter } from 'vue-router';
import { createVuetify } from 'vuetify';
import ErratumEditPage from '@/pages/ErratumEditPage.vue';
import { fakeApi, json, settle } from './fake-api';
import { boards, errata } from './fixtures';

const stub = { template: '<div />' };
const categories = {
  items: [
    { slug: 'power', name: 'Power', description: '' },
    { slug: 'firmware', name: 'Firmware', description: '' },
  ],
};
const editorViewer = { canEdit: true, canOwn: true, canRestore: true, canPropose: false };
const list = (viewer = editorViewer) => ({ items: errata, boards, categories: categories.items, viewer });

function detail(): ErratumDetail {
  return {
    ...errata[1]!, // E2, revision 1 in the fixtures
    revision: 6,
    tags: [{ slug: 'ldo', name: 'LDO', state: 'approved' }],
    projectSlug: 'greenhouse-node',
    projectTitle: 'Greenhouse node',
    boards,
    lessons: [],
    viewer: editorViewer,
  };
}

let wrapper: VueWrapper | null = null;
beforeEach(() => {
  setActivePinia(createPinia());
  localStorage.clear();
});
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  vi.unstubAllGlobals();
  document.body.innerHTML = '';
});

async function open(path: string) {
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/projects/:slug/errata', name: 'project-errata', component: stub },
      { path: '/projects/:slug/errata/new', name: 'erratum-new', component: ErratumEditPage },
      { path: '/projects/:slug/errata/:code', name: 'erratum', component: stub },
      { path: '/projects/:slug/errata/:code/edit', name: 'erratum-edit', component: ErratumEditPage },
      { path: '/projects/:slug/errata/:code/history', name: 'erratum-history', component: stub },
      { path: '/projects/:slug/propose/erratum', name: 'proposal-new-erratum', component: stub },
      { path: '/projects/:slug/errata/:code/propose', name: 'proposal-edit-erratum', component: stub },
    ],
  });
  await router.push(path);
  await router.isReady();
  wrapper = mount(
    { template: '<RouterView />' },
    { global: { plugins: [createVuetify(), router] }, attachTo: document.body },
  );
  await settle();
  return { wrapper, router };
}

async function type(name: string, value: string) {
  const input = document.querySelector<HTMLInputElement>(`input[name="${name}"]`)!;
  input.value = value;
  input.dispatchEvent(new Event('input'));
  await nextTick();
}

async function submit(w: VueWrapper) {
  await w.get('form').trigger('submit');
  await settle();
}

describe('ErratumEditPage', () => {
  it('checks a new erratum before sending it and asks for a category', async () => {
    const api = fakeApi({
      'GET /api/projects/greenhouse-node/errata': json(list()),
      'GET /api/categories': json(categories),
    });
    const { wrapper } = await open('/projects/greenhouse-node/errata/new');
    await type('title', 'Buzzer clicks at boot');
    await submit(wrapper);
    expect(api.writes()).toEqual([]);
    expect(document.body.textContent).toContain('Choose a category');
  });

  it('sends a new erratum with its fields and goes to its page', async () => {
    const created = { ...detail(), number: 7, code: 'E7', revision: 1 };
    const api = fakeApi({
      'GET /api/projects/greenhouse-node/errata': json(list()),
      'GET /api/categories': json(categories),
      'POST /api/projects/greenhouse-node/errata': json(created, 201),
    });
    const { wrapper, router } = await open('/projects/greenhouse-node/errata/new');
    await type('title', 'Buzzer clicks at boot');
    const form = wrapper.findComponent({ name: 'ErratumForm' });
    form.vm.$emit('update:modelValue', {
      ...(form.props('modelValue') as object),
      category: 'firmware',
      affected: [12],
    });
    await nextTick();
    await submit(wrapper);
    expect(api.writes()).toHaveLength(1);
    expect(api.writes()[0]!.body).toMatchObject({
      title: 'Buzzer clicks at boot',
      category: 'firmware',
      severity: 'minor',
      status: 'open',
      affected: [12],
      fixedIn: null,
      tags: [],
      message: '',
    });
    expect(router.currentRoute.value.fullPath).toBe('/projects/greenhouse-node/errata/E7');
  });

  it('saves an edit on top of the revision it was opened at, with the tags it carries', async () => {
    const api = fakeApi({
      'GET /api/projects/greenhouse-node/errata/2': json(detail()),
      'GET /api/categories': json(categories),
      'PUT /api/projects/greenhouse-node/errata/2': json({
        outcome: 'saved',
        mergedWith: null,
        erratum: { ...detail(), title: 'Regulator overheats above 350 mA', revision: 7 },
      }),
    });
    const { wrapper } = await open('/projects/greenhouse-node/errata/E2/edit');
    await type('title', 'Regulator overheats above 350 mA');
    await submit(wrapper);
    expect(api.writes()).toHaveLength(1);
    expect(api.writes()[0]!.url).toBe('/api/projects/greenhouse-node/errata/2');
    expect(api.writes()[0]!.body).toMatchObject({
      title: 'Regulator overheats above 350 mA',
      affected: [12, 11],
      category: 'power',
      severity: 'critical',
      tags: ['LDO'],
      baseRevision: 6,
    });
  });

  it('points a member who may not edit to a proposal', async () => {
    const api = fakeApi({
      'GET /api/projects/greenhouse-node/errata': json(
        list({ canEdit: false, canOwn: false, canRestore: false, canPropose: true }),
      ),
      'GET /api/categories': json(categories),
    });
    const { wrapper } = await open('/projects/greenhouse-node/errata/new');
    const forbidden = wrapper.get('[data-testid="forbidden"]');
    expect(forbidden.get('a').text()).toBe('Propose an erratum');
    expect(forbidden.get('a').attributes('href')).toBe('/projects/greenhouse-node/propose/erratum');
    expect(wrapper.find('form').exists()).toBe(false);
    expect(api.writes()).toEqual([]);
  });
});
