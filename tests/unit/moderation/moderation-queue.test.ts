// @vitest-environment happy-dom
/**
 * The flag queue against a fake API: a flagged target shows in context with its flags; hiding it
 * needs a public reason, sends that reason, says what happened and takes the target off the open
 * list; a refusal (already hidden) is shown in the dialog.
 */
import '../editor/vuetify-env';
import type { FlagGroup } from '@shared/contracts/moderation';
import { mount, type VueWrapper } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { nextTick } from 'vue';
import { createMemoryHistory, createRouter } from 'vue-router';
import { createVuetify } from 'vuetify';
import ModerationQueuePage from '@/pages/ModerationQueuePage.vue';
import { fakeApi, json, settle } from '../errata/fake-api';

const stub = { template: '<div />' };
const flagger = { id: 7, handle: 'tamsin-reed', displayName: 'Tamsin Reed', avatarUrl: null };
const writer = { id: 8, handle: 'pell-arnott', displayName: 'Pell Arnott', avatarUrl: null };

const group: FlagGroup = {
  target: {
    kind: 'comment',
    id: 12,
    title: 'Comment by pell-arnott',
    excerpt: 'Buy cheap relay boards at my shop, link in profile.',
    project: { slug: 'pond-pump-timer', title: 'Pond pump timer' },
    author: writer,
    link: { name: 'erratum', params: { slug: 'pond-pump-timer', code: 'E3' }, hash: 'comment-12' },
    hidden: null,
  },
  flagCount: 1,
  reasons: [{ reason: 'spam', count: 1 }],
  flags: [
    {
      id: 31,
      targetKind: 'comment',
      targetId: 12,
      reason: 'spam',
      text: 'Advertising in the middle of a fix discussion.',
      state: 'open',
      createdAt: '2026-03-05T08:00:00.000Z',
      handledAt: null,
      author: flagger,
      handledBy: null,
    },
  ],
  firstFlaggedAt: '2026-03-05T08:00:00.000Z',
  lastFlaggedAt: '2026-03-05T08:00:00.000Z',
};

let wrapper: VueWrapper | null = null;
beforeEach(() => setActivePinia(createPinia()));
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  vi.unstubAllGlobals();
  document.body.innerHTML = '';
});

async function open() {
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/moderation', name: 'moderation-queue', component: ModerationQueuePage },
      { path: '/moderation/tags', name: 'moderation-tags', component: stub },
      { path: '/moderation/audit', name: 'audit-log', component: stub },
      { path: '/projects/:slug/errata/:code', name: 'erratum', component: stub },
    ],
  });
  await router.push('/moderation');
  await router.isReady();
  wrapper = mount(
    { template: '<RouterView />' },
    { global: { plugins: [createVuetify(), router] }, attachTo: document.body },
  );
  await settle();
  return wrapper;
}

const q = <T extends Element = HTMLElement>(testid: string) => document.querySelector<T>(`[data-testid="${testid}"]`);
async function typeReason(text: string) {
  const area = document.querySelector<HTMLTextAreaElement>('[data-testid="moderation-reason"] textarea')!;
  area.value = text;
  area.dispatchEvent(new Event('input'));
  await nextTick();
}

describe('ModerationQueuePage', () => {
  it('shows the flagged content in context with the flag, its reason and text, and a link to it', async () => {
    fakeApi({ 'GET /api/moderation/flags': json({ items: [group], total: 1, page: 1, pageSize: 20 }) });
    const w = await open();
    const card = w.get('[data-target="comment-12"]');
    expect(card.text()).toContain('Comment by pell-arnott');
    expect(card.text()).toContain('in Pond pump timer · by Pell Arnott (@pell-arnott)');
    expect(card.get('[data-testid="target-excerpt"]').text()).toBe(
      'Buy cheap relay boards at my shop, link in profile.',
    );
    expect(card.get('[data-flag="31"]').text()).toContain('Spam or advertising');
    expect(card.get('[data-flag="31"]').text()).toContain('Advertising in the middle of a fix discussion.');
    expect(card.find('a[href="/projects/pond-pump-timer/errata/E3#comment-12"]').exists()).toBe(true);
  });

  it('hides only with a public reason, sends it, says what happened and removes the group', async () => {
    const api = fakeApi({
      'GET /api/moderation/flags': json({ items: [group], total: 1, page: 1, pageSize: 20 }),
      'POST /api/moderation/targets/comment/12/hide': (call) => ({
        status: 200,
        body: {
          target: {
            ...group.target,
            hidden: { reason: (call.body as { reason: string }).reason, at: '2026-03-05T09:00:00.000Z' },
          },
          actionedFlags: 1,
        },
      }),
    });
    const w = await open();
    w.get('[data-testid="hide-target"]').trigger('click');
    await settle();
    expect(q('moderation-action-dialog')?.getAttribute('data-action')).toBe('hide');

    q<HTMLButtonElement>('moderation-confirm')!.click();
    await settle();
    expect(api.writes()).toHaveLength(0);
    expect(q('moderation-action-dialog')?.textContent).toMatch(/Public reason/);
    expect(w.find('[data-target="comment-12"]').exists()).toBe(true);

    await typeReason('Advertising is not allowed in discussions.');
    q<HTMLButtonElement>('moderation-confirm')!.click();
    await settle();

    expect(api.writes()).toEqual([
      {
        method: 'POST',
        url: '/api/moderation/targets/comment/12/hide',
        body: { reason: 'Advertising is not allowed in discussions.' },
      },
    ]);
    expect(w.get('[data-testid="queue-result"]').text()).toBe(
      '“Comment by pell-arnott” is hidden; 1 open flag closed.',
    );
    expect(w.find('[data-target="comment-12"]').exists()).toBe(false);
    expect(w.get('[data-testid="queue-empty"]').text()).toContain('Nothing is waiting');
  });

  it('keeps the group and shows the refusal when the content was hidden meanwhile', async () => {
    fakeApi({
      'GET /api/moderation/flags': json({ items: [group], total: 1, page: 1, pageSize: 20 }),
      'POST /api/moderation/targets/comment/12/hide': json(
        { error: { code: 'conflict', message: 'It is already hidden.' } },
        409,
      ),
    });
    const w = await open();
    w.get('[data-testid="hide-target"]').trigger('click');
    await settle();
    await typeReason('Advertising is not allowed.');
    q<HTMLButtonElement>('moderation-confirm')!.click();
    await settle();
    expect(q('moderation-action-dialog')?.textContent).toContain('It is already hidden.');
    expect(w.find('[data-target="comment-12"]').exists()).toBe(true);
  });

  it('dismisses one flag with an optional note and drops the group once no flag is open', async () => {
    const api = fakeApi({
      'GET /api/moderation/flags': json({ items: [group], total: 1, page: 1, pageSize: 20 }),
      'POST /api/moderation/flags/31/dismiss': json({ ...group.flags[0], state: 'dismissed' }),
    });
    const w = await open();
    w.get('[data-testid="dismiss-flag"]').trigger('click');
    await settle();
    q<HTMLButtonElement>('moderation-confirm')!.click();
    await settle();
    expect(api.writes()).toEqual([{ method: 'POST', url: '/api/moderation/flags/31/dismiss', body: { reason: '' } }]);
    expect(w.find('[data-target="comment-12"]').exists()).toBe(false);
  });
});
