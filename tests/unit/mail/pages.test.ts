// @vitest-environment happy-dom
/**
 * The unsubscribe page and the development outbox page against a stubbed fetch that records
 * what the pages ask for.
 */
import '../editor/vuetify-env';
import { flushPromises, mount, type VueWrapper } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { createMemoryHistory, createRouter, RouterView } from 'vue-router';
import { createVuetify } from 'vuetify';
import DevOutboxPage from '@/pages/DevOutboxPage.vue';
import UnsubscribePage from '@/pages/UnsubscribePage.vue';
import { useNotifierStore } from '@/stores/notifier';

type Answer = { status: number; body: unknown };
let answers: Record<string, Answer> = {};
let calls: { method: string; url: string }[] = [];

beforeEach(() => {
  setActivePinia(createPinia());
  calls = [];
  answers = {};
  vi.stubGlobal(
    'fetch',
    vi.fn(async (url: string, init: RequestInit) => {
      const method = init.method ?? 'GET';
      calls.push({ method, url });
      const answer = answers[`${method} ${url}`] ?? {
        status: 404,
        body: { error: { code: 'not_found', message: `No ${url}` } },
      };
      return new Response(JSON.stringify(answer.body), {
        status: answer.status,
        headers: { 'Content-Type': 'application/json' },
      });
    }),
  );
});

let wrapper: VueWrapper | null = null;
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  vi.unstubAllGlobals();
  vi.restoreAllMocks();
});

async function mountAt(path: string) {
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/unsubscribe', component: UnsubscribePage },
      { path: '/dev/outbox', component: DevOutboxPage },
      { path: '/me/settings/notifications', name: 'notification-settings', component: { render: () => null } },
    ],
  });
  await router.push(path);
  wrapper = mount(RouterView, { global: { plugins: [router, createVuetify()] }, attachTo: document.body });
  await flushPromises();
  return wrapper;
}

const TOKEN = 'AQAAAAMHY29tbWVudIVAQYQTP78F1GYmrcYV2QdABeesEhvWR459DmuWe-4W';
const API = `/api/unsubscribe?token=${TOKEN}`;

describe('the unsubscribe page', () => {
  it('explains what the link turns off and changes nothing until the button is pressed', async () => {
    answers[`GET ${API}`] = { status: 200, body: { kind: 'comment', mode: 'immediate' } };
    const page = await mountAt(`/unsubscribe?token=${TOKEN}`);
    expect(page.text()).toContain('This link turns off e-mails when someone comments in a discussion you are part of.');
    expect(calls).toEqual([{ method: 'GET', url: API }]);

    answers[`POST ${API}`] = { status: 200, body: { kind: 'comment', mode: 'off' } };
    await page.get('[data-testid="unsubscribe-confirm"]').trigger('click');
    await flushPromises();
    expect(calls.map((c) => `${c.method} ${c.url}`)).toEqual([`GET ${API}`, `POST ${API}`]);
    expect(page.get('[data-testid="unsubscribe-done"]').text()).toContain(
      'you will no longer get e-mails when someone comments in a discussion you are part of',
    );
    expect(page.find('[data-testid="unsubscribe-confirm"]').exists()).toBe(false);
  });

  it('names the daily digest as a whole for a digest link', async () => {
    answers[`GET ${API}`] = { status: 200, body: { kind: 'daily_digest', mode: 'daily' } };
    const page = await mountAt(`/unsubscribe?token=${TOKEN}`);
    expect(page.text()).toContain('This link turns off the daily digest');
  });

  it('says so when these e-mails are already off, and offers no button', async () => {
    answers[`GET ${API}`] = { status: 200, body: { kind: 'comment', mode: 'off' } };
    const page = await mountAt(`/unsubscribe?token=${TOKEN}`);
    expect(page.text()).toContain(
      'You already get no e-mails when someone comments in a discussion you are part of. Nothing to change.',
    );
    expect(page.find('[data-testid="unsubscribe-confirm"]').exists()).toBe(false);
  });

  it('tells the reader a refused link is not valid, without raising an error', async () => {
    answers[`GET ${API}`] = {
      status: 400,
      body: { error: { code: 'bad_request', message: 'This unsubscribe link is not valid.' } },
    };
    const page = await mountAt(`/unsubscribe?token=${TOKEN}`);
    expect(page.get('[role="alert"]').text()).toContain('This unsubscribe link is not valid');
    expect(page.find('[data-testid="unsubscribe-confirm"]').exists()).toBe(false);
    expect(useNotifierStore().queue).toEqual([]);
  });

  it('asks the server nothing when the address has no token', async () => {
    const page = await mountAt('/unsubscribe');
    expect(page.get('[role="alert"]').text()).toContain('not valid');
    expect(calls).toEqual([]);
  });
});

describe('the development outbox page', () => {
  const summary = {
    id: '20260301T101500000-0a1b2c3d',
    to: 'ilse@makers.invalid',
    subject: 'Bram Tolliver proposed an erratum on Greenhouse vent controller',
    receivedAt: '2026-03-01T10:15:00.000Z',
  };

  it('lists captured messages and shows one with its plain text and its HTML in a sandboxed frame', async () => {
    answers['GET /api/dev/outbox'] = { status: 200, body: { items: [summary] } };
    answers[`GET /api/dev/outbox/${summary.id}`] = {
      status: 200,
      body: {
        ...summary,
        from: 'Reworkbook <notifications@reworkbook.invalid>',
        headers: [{ name: 'List-Unsubscribe-Post', value: 'List-Unsubscribe=One-Click' }],
        text: 'Hello Ilse Marrow,\n\nBram Tolliver proposed an erratum.',
        html: '<p>Hello <script>parent.alert(1)</script></p>',
      },
    };
    const page = await mountAt('/dev/outbox');
    const item = page.get(`[data-message-id="${summary.id}"]`);
    expect(item.text()).toContain(summary.subject);
    await item.trigger('click');
    await flushPromises();

    const message = page.get('[data-testid="outbox-message"]');
    expect(message.get('pre').text()).toBe('Hello Ilse Marrow,\n\nBram Tolliver proposed an erratum.');
    const frame = message.get('iframe');
    // An empty sandbox attribute grants nothing: no scripts, no same-origin access.
    expect(frame.attributes('sandbox')).toBe('');
    expect(frame.attributes('srcdoc')).toBe('<p>Hello <script>parent.alert(1)</script></p>');
    expect(message.text()).not.toContain('parent.alert');
  });

  it('sends an unexpected failure to the notifier', async () => {
    answers['GET /api/dev/outbox'] = {
      status: 500,
      body: { error: { code: 'internal', message: 'Something broke on the server.' } },
    };
    vi.spyOn(console, 'warn').mockImplementation(() => {});
    await mountAt('/dev/outbox');
    expect(useNotifierStore().queue.map((n) => [n.tone, n.text])).toEqual([
      ['error', 'Something broke on the server.'],
    ]);
  });

  it('says there is no outbox when the server has none', async () => {
    const page = await mountAt('/dev/outbox');
    expect(page.get('[role="status"]').text()).toContain('keeps no outbox');
  });
});
