// @vitest-environment happy-dom
/** The settings page shows every kind with its mode and saves a changed mode at once. */
import '../editor/vuetify-env';
import { notificationKindLabels } from '@shared/contracts/errata';
import { flushPromises, mount, type VueWrapper } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { createVuetify } from 'vuetify';
import NotificationSettingsPage from '@/pages/NotificationSettingsPage.vue';
import { useSessionStore } from '@/stores/session';
import { fakeServer, ok, people, signedInAs } from '../proposals/fake-server';

const API = '/api/me/notification-settings';
const stored = {
  proposal_received: 'immediate',
  proposal_decided: 'immediate',
  comment: 'immediate',
  new_erratum: 'daily',
};

let wrapper: VueWrapper | null = null;
beforeEach(() => {
  setActivePinia(createPinia());
  useSessionStore().user = signedInAs(people.contributor);
});
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  document.body.innerHTML = '';
  vi.unstubAllGlobals();
});

async function openPage() {
  wrapper = mount(NotificationSettingsPage, { global: { plugins: [createVuetify()] }, attachTo: document.body });
  await flushPromises();
  return wrapper;
}

const radio = (kind: string, mode: string) =>
  document.querySelector<HTMLInputElement>(`[data-kind="${kind}"] [data-mode="${mode}"] input[type="radio"]`)!;

describe('NotificationSettingsPage', () => {
  it('shows each kind under its label with the stored mode chosen', async () => {
    fakeServer({ [`GET ${API}`]: ok({ modes: stored }) });
    const page = await openPage();
    expect(page.get('[data-kind="comment"]').text()).toContain(notificationKindLabels.comment);
    expect(radio('new_erratum', 'daily').checked).toBe(true);
    expect(radio('proposal_received', 'immediate').checked).toBe(true);
    expect(radio('proposal_received', 'off').checked).toBe(false);
  });

  it('saves a changed mode for that kind alone', async () => {
    const server = fakeServer({
      [`GET ${API}`]: ok({ modes: stored }),
      [`PUT ${API}`]: (call) => ({
        status: 200,
        body: { modes: { ...stored, ...(call.body as { modes: Record<string, string> }).modes } },
      }),
    });
    await openPage();
    radio('comment', 'off').click();
    await flushPromises();
    expect(server.writes()).toEqual([{ method: 'PUT', url: API, body: { modes: { comment: 'off' } } }]);
    expect(radio('comment', 'off').checked).toBe(true);
  });

  it('says that e-mail goes to the sign-in account’s address', async () => {
    fakeServer({ [`GET ${API}`]: ok({ modes: stored }) });
    const page = await openPage();
    expect(page.get('[data-testid="email-note"]').text()).toContain('bram-tolliver@example.org');
  });
});
