// @vitest-environment happy-dom
/**
 * The bell: its accessible name carries the unread count; it polls every minute while the tab is
 * visible, at once when the tab comes back, and on every route change; signed-out visitors see none.
 */
import '../editor/vuetify-env';
import type { Notification } from '@shared/contracts/errata';
import { flushPromises, mount, type VueWrapper } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { defineComponent, h } from 'vue';
import { createMemoryHistory, createRouter } from 'vue-router';
import { createVuetify } from 'vuetify';
import TheNotificationBell from '@/components/layout/TheNotificationBell.vue';
import { useNotifications } from '@/composables/notifications';
import { useSessionStore } from '@/stores/session';
import { fakeServer, ok, people, signedInAs } from '../proposals/fake-server';

const API = '/api/me/notifications';

function note(id: number, read: boolean): Notification {
  return {
    id,
    kind: 'proposal_received',
    payload: {
      projectSlug: 'greenhouse-vent',
      projectTitle: 'Greenhouse vent controller',
      actor: { handle: 'bram-tolliver', displayName: 'Bram Tolliver' },
      proposalId: id,
      proposalKind: 'new_erratum',
      path: `/proposals/${id}`,
    },
    read,
    createdAt: `2026-03-0${id}T10:00:00.000Z`,
  };
}

const three = { items: [note(1, false), note(2, false), note(3, false), note(4, true)], unreadCount: 3 };

let visibility: DocumentVisibilityState = 'visible';
Object.defineProperty(document, 'visibilityState', { configurable: true, get: () => visibility });

function setVisibility(next: DocumentVisibilityState) {
  visibility = next;
  document.dispatchEvent(new Event('visibilitychange'));
}

let wrapper: VueWrapper | null = null;
beforeEach(() => {
  setActivePinia(createPinia());
  useNotifications().clear();
  visibility = 'visible';
  vi.useFakeTimers({ toFake: ['setInterval', 'clearInterval'] });
});
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  document.body.innerHTML = '';
  vi.useRealTimers();
  vi.unstubAllGlobals();
});

const Page = defineComponent({ render: () => h('p', 'page') });

async function mountBell(signedIn = true) {
  if (signedIn) useSessionStore().user = signedInAs(people.maker);
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/', name: 'home', component: Page },
      { path: '/elsewhere', name: 'elsewhere', component: Page },
      { path: '/me/notifications', name: 'notifications', component: Page },
      { path: '/me/settings/notifications', name: 'notification-settings', component: Page },
      { path: '/proposals/:proposalId', name: 'proposal', component: Page },
    ],
  });
  await router.push('/');
  wrapper = mount(TheNotificationBell, { global: { plugins: [router, createVuetify()] }, attachTo: document.body });
  await flushPromises();
  return { wrapper, router };
}

const bell = () => document.querySelector<HTMLButtonElement>('[data-testid="notification-bell"]');

describe('TheNotificationBell', () => {
  it('names the unread count in its label', async () => {
    fakeServer({ [`GET ${API}`]: ok(three) });
    await mountBell();
    expect(bell()!.getAttribute('aria-label')).toBe('Notifications, 3 unread');
    expect(document.querySelector('[data-testid="unread-badge"]')!.textContent).toContain('3');
  });

  it('polls every 60 seconds while the tab is visible, and not while it is hidden', async () => {
    const server = fakeServer({ [`GET ${API}`]: ok(three) });
    await mountBell();
    const fetches = () => server.calls.filter((c) => c.url === API).length;
    expect(fetches()).toBe(1);

    await vi.advanceTimersByTimeAsync(60_000);
    expect(fetches()).toBe(2);

    setVisibility('hidden');
    await vi.advanceTimersByTimeAsync(180_000);
    expect(fetches()).toBe(2);

    setVisibility('visible');
    await flushPromises();
    expect(fetches()).toBe(3);
  });

  it('refreshes on a route change', async () => {
    const server = fakeServer({ [`GET ${API}`]: ok({ items: [], unreadCount: 0 }) });
    const { router } = await mountBell();
    expect(bell()!.getAttribute('aria-label')).toBe('Notifications, none unread');
    server.answer(`GET ${API}`, ok(three));
    await router.push('/elsewhere');
    await flushPromises();
    expect(server.calls.filter((c) => c.url === API)).toHaveLength(2);
    expect(bell()!.getAttribute('aria-label')).toBe('Notifications, 3 unread');
  });

  it('marks all read from its menu', async () => {
    const server = fakeServer({
      [`GET ${API}`]: ok(three),
      [`POST ${API}/read`]: ok({ items: three.items.map((n) => ({ ...n, read: true })), unreadCount: 0 }),
    });
    await mountBell();
    bell()!.click();
    await flushPromises();
    document.querySelector<HTMLButtonElement>('[data-testid="bell-mark-all"]')!.click();
    await flushPromises();
    expect(server.writes()).toEqual([{ method: 'POST', url: `${API}/read`, body: { all: true } }]);
    expect(bell()!.getAttribute('aria-label')).toBe('Notifications, none unread');
  });

  it('shows nothing and asks nothing when signed out', async () => {
    const server = fakeServer({ [`GET ${API}`]: ok(three) });
    await mountBell(false);
    expect(bell()).toBeNull();
    await vi.advanceTimersByTimeAsync(120_000);
    expect(server.calls).toHaveLength(0);
  });
});
