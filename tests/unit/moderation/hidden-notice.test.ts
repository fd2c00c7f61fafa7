// @vitest-environment happy-dom
/**
 * Hidden content as readers meet it: a 410 `gone` answer shows the moderators' public reason in
 * place of the erratum; the author, who still receives it, sees it under a "Hidden by moderators"
 * banner.
 */
import '../editor/vuetify-env';
import type { ErratumDetail } from '@shared/contracts/errata';
import { mount, type VueWrapper } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { createMemoryHistory, createRouter } from 'vue-router';
import { createVuetify } from 'vuetify';
import HiddenNotice from '@/components/moderation/HiddenNotice.vue';
import ErratumPage from '@/pages/ErratumPage.vue';
import { fakeApi, json, settle } from '../errata/fake-api';
import { boards, errata } from '../errata/fixtures';

const stub = { template: '<div />' };
const reason = 'The workaround connects mains to the low-voltage side.';

let wrapper: VueWrapper | null = null;
beforeEach(() => setActivePinia(createPinia()));
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  vi.unstubAllGlobals();
  document.body.innerHTML = '';
});

async function openErratum() {
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/projects/:slug', name: 'project', component: stub },
      { path: '/projects/:slug/errata', name: 'project-errata', component: stub },
      { path: '/projects/:slug/errata/:code', name: 'erratum', component: ErratumPage },
      { path: '/projects/:slug/errata/:code/edit', name: 'erratum-edit', component: stub },
      { path: '/projects/:slug/errata/:code/history', name: 'erratum-history', component: stub },
      { path: '/projects/:slug/errata/:code/propose', name: 'proposal-edit-erratum', component: stub },
      { path: '/tags/:tagSlug', name: 'tag', component: stub },
    ],
  });
  await router.push('/projects/greenhouse-node/errata/E4');
  await router.isReady();
  wrapper = mount(
    { template: '<RouterView />' },
    { global: { plugins: [createVuetify(), router] }, attachTo: document.body },
  );
  await settle();
  return wrapper;
}

describe('hidden content', () => {
  it('shows the public reason in place of an erratum answered 410 gone', async () => {
    fakeApi({
      'GET /api/projects/greenhouse-node/errata/4': json(
        {
          error: {
            code: 'gone',
            message: 'Hidden by moderators.',
            details: { hidden: { reason, at: '2026-03-05T09:00:00.000Z' } },
          },
        },
        410,
      ),
    });
    const w = await openErratum();
    const notice = w.get('[data-testid="hidden-notice"]');
    expect(notice.attributes('data-mode')).toBe('replaced');
    expect(notice.text()).toContain('This erratum was hidden by moderators');
    expect(notice.get('[data-testid="hidden-reason"]').text()).toBe(reason);
    expect(w.find('[data-testid="erratum-title"]').exists()).toBe(false);
  });

  it('shows the author the content under a banner with the reason', async () => {
    const detail: ErratumDetail = {
      ...errata[3]!,
      html: { symptom: '<p>The plug only fits upside down.</p>', cause: '', workaround: '', fix: '' },
      projectSlug: 'greenhouse-node',
      projectTitle: 'Greenhouse node',
      boards,
      lessons: [],
      viewer: { canEdit: true, canOwn: true, canRestore: false, canPropose: false },
      hidden: { reason, at: '2026-03-05T09:00:00.000Z' },
    };
    fakeApi({
      'GET /api/projects/greenhouse-node/errata/4': json(detail),
      'GET /api/projects/greenhouse-node/errata/4/comments': json({ items: [], canComment: false }),
    });
    const w = await openErratum();
    const notice = w.get('[data-testid="hidden-notice"]');
    expect(notice.attributes('data-mode')).toBe('banner');
    expect(notice.text()).toContain(`Hidden by moderators: ${reason}`);
    expect(w.get('[data-section="symptom"]').text()).toContain('The plug only fits upside down.');
  });

  it('says no reason was given rather than leaving the reason blank', () => {
    wrapper = mount(HiddenNotice, {
      props: { hidden: { reason: '  ', at: '' }, mode: 'replaced', what: 'This comment' },
      global: { plugins: [createVuetify()] },
    });
    expect(wrapper.get('[data-testid="hidden-reason"]').text()).toBe('No reason was given.');
  });
});
