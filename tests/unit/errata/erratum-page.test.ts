// @vitest-environment happy-dom
/**
 * The erratum page for the people who read it: a critical defect says the board needs the rework,
 * editors get Edit while other signed-in members get "Propose a correction", and a missing section
 * says so instead of leaving a blank.
 */
import '../editor/vuetify-env';
import type { ErratumDetail } from '@shared/contracts/errata';
import { flushPromises, mount, type VueWrapper } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { createMemoryHistory, createRouter } from 'vue-router';
import { createVuetify } from 'vuetify';
import ErratumPage from '@/pages/ErratumPage.vue';
import { fakeApi, json } from './fake-api';
import { boards, errata } from './fixtures';

const stub = { template: '<div />' };

function detail(over: Partial<ErratumDetail> = {}): ErratumDetail {
  return {
    ...errata[3]!, // E4: critical, fixed in Rev B, with a workaround
    html: {
      symptom: '<p>The plug only fits upside down.</p>',
      cause: '',
      workaround: '<p>Mount the connector on the back side.</p>',
      fix: '',
    },
    projectSlug: 'greenhouse-node',
    projectTitle: 'Greenhouse node',
    boards,
    lessons: [{ id: 7, html: '<p>Check connector footprints against the mating part.</p>' }],
    viewer: { canEdit: false, canOwn: false, canRestore: false, canPropose: false },
    ...over,
  };
}

let wrapper: VueWrapper | null = null;
beforeEach(() => setActivePinia(createPinia()));
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  vi.unstubAllGlobals();
  document.body.innerHTML = '';
});

async function open(erratum: ErratumDetail) {
  fakeApi({
    'GET /api/projects/greenhouse-node/errata/4': json(erratum),
    'GET /api/projects/greenhouse-node/errata/4/comments': json({ items: [], canComment: false }),
  });
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/projects/:slug', name: 'project', component: stub },
      { path: '/projects/:slug/errata', name: 'project-errata', component: stub },
      { path: '/projects/:slug/errata/:code', name: 'erratum', component: ErratumPage },
      { path: '/projects/:slug/errata/:code/edit', name: 'erratum-edit', component: stub },
      { path: '/projects/:slug/errata/:code/history', name: 'erratum-history', component: stub },
      { path: '/projects/:slug/errata/:code/propose', name: 'proposal-edit-erratum', component: stub },
      { path: '/sign-in', name: 'sign-in', component: stub },
    ],
  });
  await router.push('/projects/greenhouse-node/errata/E4');
  await router.isReady();
  wrapper = mount(
    { template: '<RouterView />' },
    { global: { plugins: [createVuetify(), router] }, attachTo: document.body },
  );
  await flushPromises();
  return wrapper;
}

const actionLinks = (w: VueWrapper) =>
  w
    .get('[data-testid="erratum-actions"]')
    .findAll('a')
    .map((a) => a.text());

describe('ErratumPage', () => {
  it('heads the page with the code and title and says a critical board needs the rework', async () => {
    const w = await open(detail());
    expect(w.get('[data-testid="erratum-title"]').text()).toBe('E4 · USB connector footprint mirrored');
    const note = w.get('[data-testid="critical-note"]').text();
    expect(note).toContain('the board does not work without this rework');
    expect(note).toContain('The workaround below describes it.');
  });

  it('says when a critical defect has no workaround yet, and shows no note for a minor one', async () => {
    const none = await open(detail({ workaround: '', status: 'open', html: { ...detail().html, workaround: '' } }));
    expect(none.get('[data-testid="critical-note"]').text()).toContain('No workaround is known yet.');
    none.unmount();
    wrapper = null;
    const minor = await open(detail({ severity: 'minor' }));
    expect(minor.find('[data-testid="critical-note"]').exists()).toBe(false);
  });

  it('shows the written sections and says which are still missing', async () => {
    const w = await open(detail());
    expect(w.get('[data-section="symptom"]').text()).toContain('The plug only fits upside down.');
    expect(w.get('[data-section="cause"]').text()).toContain('Not known yet.');
    expect(w.get('[data-section="fix"]').text()).toContain('No fix is recorded yet.');
    expect(w.get('[data-lesson="7"]').text()).toContain('Check connector footprints');
  });

  it('offers editors Edit and other members a proposal, never both', async () => {
    const editor = await open(detail({ viewer: { canEdit: true, canOwn: true, canRestore: true, canPropose: false } }));
    expect(actionLinks(editor)).toEqual(['Edit', 'History']);
    editor.unmount();
    const member = await open(
      detail({ viewer: { canEdit: false, canOwn: false, canRestore: false, canPropose: true } }),
    );
    expect(actionLinks(member)).toEqual(['Propose a correction', 'History']);
    expect(member.get('[data-testid="erratum-actions"] a').attributes('href')).toBe(
      '/projects/greenhouse-node/errata/E4/propose',
    );
    member.unmount();
    const reader = await open(detail());
    expect(actionLinks(reader)).toEqual(['History']);
  });
});
