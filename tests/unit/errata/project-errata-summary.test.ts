// @vitest-environment happy-dom
/**
 * The errata line on a project page: how many errata, how many open and critical, a link to the
 * table, and a board picker that opens the table for the revision the reader holds.
 */
import '../editor/vuetify-env';
import { flushPromises, mount, type VueWrapper } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { createMemoryHistory, createRouter } from 'vue-router';
import { createVuetify } from 'vuetify';
import { VSelect } from 'vuetify/components/VSelect';
import ProjectErrataSummary from '@/components/errata/ProjectErrataSummary.vue';
import { fakeApi, json, settle } from './fake-api';
import { boards, erratum, errata } from './fixtures';

const stub = { template: '<div />' };
let wrapper: VueWrapper | null = null;
beforeEach(() => setActivePinia(createPinia()));
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  vi.unstubAllGlobals();
});

async function mountSummary(items = errata) {
  fakeApi({
    'GET /api/projects/greenhouse-node/errata': json({
      items,
      boards,
      categories: [],
      viewer: { canEdit: false, canOwn: false, canRestore: false, canPropose: false },
    }),
  });
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/projects/:slug', name: 'project', component: stub },
      { path: '/projects/:slug/errata', name: 'project-errata', component: stub },
    ],
  });
  await router.push('/projects/greenhouse-node');
  wrapper = mount(ProjectErrataSummary, {
    props: { slug: 'greenhouse-node' },
    global: { plugins: [createVuetify(), router] },
  });
  await flushPromises();
  return { wrapper, router };
}

describe('ProjectErrataSummary', () => {
  it('counts the errata, the open ones and the critical ones', async () => {
    // Fixtures: E2 and E6 are open; E2 and E4 are critical.
    const { wrapper } = await mountSummary();
    expect(wrapper.get('[data-testid="errata-summary-line"]').text()).toBe('6 errata — 2 open, 2 critical');
    expect(wrapper.get('a').attributes('href')).toBe('/projects/greenhouse-node/errata');
  });

  it('leaves out what there is none of', async () => {
    const { wrapper } = await mountSummary([erratum(1, { status: 'workaround', severity: 'minor' })]);
    expect(wrapper.get('[data-testid="errata-summary-line"]').text()).toBe('1 erratum');
  });

  it('opens the table for the board revision the reader picks', async () => {
    const { wrapper, router } = await mountSummary();
    wrapper.findComponent(VSelect).vm.$emit('update:modelValue', 12);
    await settle();
    expect(router.currentRoute.value.fullPath).toBe('/projects/greenhouse-node/errata?have=12');
  });
});
