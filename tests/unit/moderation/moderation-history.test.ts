// @vitest-environment happy-dom
/**
 * A content's history page shows what moderators did to it, from the audit log, to those the API
 * answers (moderators, the author, the project's owner) — and nothing at all to anyone else.
 */
import '../editor/vuetify-env';
import { mount, type VueWrapper } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { createMemoryHistory, createRouter } from 'vue-router';
import { createVuetify } from 'vuetify';
import ModerationHistory from '@/components/moderation/ModerationHistory.vue';
import { fakeApi, json, settle } from '../errata/fake-api';

let wrapper: VueWrapper | null = null;
beforeEach(() => setActivePinia(createPinia()));
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  vi.unstubAllGlobals();
  document.body.innerHTML = '';
});

async function open() {
  const stub = { template: '<div />' };
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/', name: 'home', component: stub },
      { path: '/tags/:tagSlug', name: 'tag', component: stub },
    ],
  });
  wrapper = mount(ModerationHistory, {
    props: { targetKind: 'erratum', targetId: 41 },
    global: { plugins: [createVuetify(), router] },
    attachTo: document.body,
  });
  await settle();
  return wrapper;
}

const hidden = {
  id: 7,
  action: 'content.hide',
  actor: null,
  targetKind: 'erratum',
  targetId: '41',
  projectId: 3,
  before: { hidden: null },
  after: { hidden: { reason: 'Names a private person' } },
  reason: 'Names a private person',
  at: '2026-11-20T09:00:00.000Z',
};

describe('ModerationHistory', { timeout: 30_000 }, () => {
  it('asks the audit log for this content and lists what moderators did, with the reason', async () => {
    const api = fakeApi({
      'GET /api/audit/for/erratum/41': json({ items: [hidden], total: 1, page: 1, pageSize: 50 }),
    });
    const w = await open();
    expect(api.calls.map((c) => c.url)).toEqual(['/api/audit/for/erratum/41']);
    const section = w.get('[data-testid="moderation-history"]');
    expect(section.text()).toContain('Moderation');
    expect(section.text()).toContain('Names a private person');
  });

  it('shows nothing to a reader the audit log does not answer, and nothing when there is no entry', async () => {
    fakeApi({
      'GET /api/audit/for/erratum/41': () => ({
        status: 403,
        body: { error: { code: 'forbidden', message: 'Only moderators.' } },
      }),
    });
    const w = await open();
    expect(w.find('[data-testid="moderation-history"]').exists()).toBe(false);
    w.unmount();
    wrapper = null;
    fakeApi({ 'GET /api/audit/for/erratum/41': json({ items: [], total: 0, page: 1, pageSize: 50 }) });
    const empty = await open();
    expect(empty.find('[data-testid="moderation-history"]').exists()).toBe(false);
  });
});
