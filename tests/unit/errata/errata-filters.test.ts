// @vitest-environment happy-dom
/**
 * The errata filters live in the address: a shared link opens the same view, changes replace the
 * history entry, and query keys that are not filters are left alone.
 */
import { flushPromises, mount } from '@vue/test-utils';
import { describe, expect, it } from 'vitest';
import { defineComponent, h } from 'vue';
import { createMemoryHistory, createRouter } from 'vue-router';
import { useErrataFilters } from '@/composables/errata';

async function setup(start: string) {
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/projects/:slug', name: 'project', component: { render: () => null } },
      { path: '/projects/:slug/errata', name: 'project-errata', component: { render: () => null } },
    ],
  });
  await router.push('/projects/greenhouse-node');
  await router.push(start);
  await router.isReady();
  let api!: ReturnType<typeof useErrataFilters>;
  const Host = defineComponent({
    setup() {
      api = useErrataFilters();
      return () => h('div');
    },
  });
  mount(Host, { global: { plugins: [router] } });
  return { router, api };
}

describe('useErrataFilters', () => {
  it('reads the view from a shared link', async () => {
    const { api } = await setup('/projects/greenhouse-node/errata?have=12&status=open,workaround&sort=-severity');
    expect(api.filters.value.myBoard).toBe(12);
    expect(api.filters.value.statuses).toEqual(['open', 'workaround']);
    expect(api.filters.value.sort).toEqual({ key: 'severity', order: 'desc' });
  });

  it('writes a change into the query and keeps keys that are not filters', async () => {
    const { router, api } = await setup('/projects/greenhouse-node/errata?from=summary');
    api.update({ severities: ['critical'] });
    await flushPromises();
    expect(router.currentRoute.value.query).toEqual({ from: 'summary', severity: 'critical' });
    expect(api.filters.value.severities).toEqual(['critical']);
  });

  it('keeps both of two changes made before the first navigation lands', async () => {
    const { router, api } = await setup('/projects/greenhouse-node/errata');
    api.update({ myBoard: 11 });
    api.update({ categories: ['power'] });
    await flushPromises();
    expect(router.currentRoute.value.query).toEqual({ have: '11', category: 'power' });
  });

  it('replaces the history entry instead of adding one per change', async () => {
    const { router, api } = await setup('/projects/greenhouse-node/errata');
    api.update({ text: 'relay' });
    await flushPromises();
    api.update({ text: 'relay k1' });
    await flushPromises();
    expect(router.currentRoute.value.query).toEqual({ q: 'relay k1' });
    // One step back leaves the table for the page before it.
    router.back();
    await flushPromises();
    await new Promise((resolve) => setTimeout(resolve, 0));
    expect(router.currentRoute.value.path).toBe('/projects/greenhouse-node');
  });

  it('clears every filter but keeps the sort', async () => {
    const { router, api } = await setup('/projects/greenhouse-node/errata?have=11&q=motor&sort=title');
    api.clear();
    await flushPromises();
    expect(router.currentRoute.value.query).toEqual({ sort: 'title' });
  });
});
