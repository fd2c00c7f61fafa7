// @vitest-environment happy-dom
/**
 * Flagging: only signed-in members see "Flag"; the dialog sends `{ targetKind, targetId, reason,
 * text }`, thanks the member, says so when they had already flagged it, and asks for details when
 * the reason is "Something else".
 */
import '../editor/vuetify-env';
import { mount, type VueWrapper } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { nextTick } from 'vue';
import { createVuetify } from 'vuetify';
import FlagButton from '@/components/moderation/FlagButton.vue';
import { useSessionStore } from '@/stores/session';
import { fakeApi, json, settle } from '../errata/fake-api';

const member = {
  id: 5,
  handle: 'tamsin-reed',
  displayName: 'Tamsin Reed',
  avatarUrl: null,
  email: 'tamsin@example.org',
  role: 'member' as const,
};

function flag(over: Record<string, unknown> = {}) {
  return {
    id: 90,
    targetKind: 'erratum',
    targetId: 104,
    reason: 'unsafe',
    text: '',
    state: 'open',
    createdAt: '2026-03-02T10:00:00.000Z',
    handledAt: null,
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

async function mountButton(signedIn = true) {
  if (signedIn) useSessionStore().user = member as never;
  wrapper = mount(FlagButton, {
    props: { targetKind: 'erratum', targetId: 104, what: 'erratum E4' },
    global: { plugins: [createVuetify()] },
    attachTo: document.body,
  });
  await settle();
  return wrapper;
}

const q = <T extends Element = HTMLElement>(testid: string) => document.querySelector<T>(`[data-testid="${testid}"]`);

async function openDialog() {
  q<HTMLButtonElement>('flag-button')!.click();
  await settle();
}
async function chooseReason(label: string) {
  const radio = [
    ...document.querySelectorAll<HTMLInputElement>('[data-testid="flag-reasons"] input[type="radio"]'),
  ].find((input) => input.closest('.v-radio')?.textContent?.includes(label));
  radio!.click();
  await nextTick();
}
async function typeText(text: string) {
  const area = document.querySelector<HTMLTextAreaElement>('[data-testid="flag-text"] textarea')!;
  area.value = text;
  area.dispatchEvent(new Event('input'));
  await nextTick();
}

describe('FlagButton and its dialog', () => {
  it('is not offered to readers who are not signed in', async () => {
    await mountButton(false);
    expect(q('flag-button')).toBeNull();
  });

  it('sends the target, the reason and the text, then thanks the member', async () => {
    const api = fakeApi({
      'POST /api/flags': (call) => ({
        status: 201,
        body: { flag: flag(call.body as Record<string, unknown>), repeated: false },
      }),
    });
    await mountButton();
    await openDialog();
    expect(q('flag-dialog')?.textContent).toContain('Flag erratum E4');

    q<HTMLButtonElement>('flag-submit')!.click();
    await settle();
    expect(api.writes()).toHaveLength(0);
    expect(document.body.textContent).toContain('Choose what is wrong');

    await chooseReason('Unsafe advice');
    await typeText('The workaround bridges mains to the logic ground.');
    q<HTMLButtonElement>('flag-submit')!.click();
    await settle();

    expect(api.writes()).toEqual([
      {
        method: 'POST',
        url: '/api/flags',
        body: {
          targetKind: 'erratum',
          targetId: 104,
          reason: 'unsafe',
          text: 'The workaround bridges mains to the logic ground.',
        },
      },
    ]);
    expect(q('flag-done')?.textContent).toContain('Thanks — moderators will look at it.');
  });

  it('says so when the member had already flagged it', async () => {
    fakeApi({ 'POST /api/flags': json({ flag: flag({ reason: 'wrong' }), repeated: true }) });
    await mountButton();
    await openDialog();
    await chooseReason('Spam or advertising');
    q<HTMLButtonElement>('flag-submit')!.click();
    await settle();
    const done = q('flag-done')!.textContent!;
    expect(done).toContain('You already flagged this');
    expect(done).not.toContain('Thanks');
  });

  it('asks for details with "Something else" before sending anything', async () => {
    const api = fakeApi({ 'POST /api/flags': json({ flag: flag(), repeated: false }, 201) });
    await mountButton();
    await openDialog();
    await chooseReason('Something else');
    q<HTMLButtonElement>('flag-submit')!.click();
    await settle();
    expect(api.writes()).toHaveLength(0);
    expect(document.body.textContent).toContain('Say what is wrong when choosing "Something else"');
  });

  it('shows the refusal for flagging your own content in the dialog', async () => {
    fakeApi({
      'POST /api/flags': json({ error: { code: 'forbidden', message: 'You cannot flag your own content.' } }, 403),
    });
    await mountButton();
    await openDialog();
    await chooseReason('Technically wrong or misleading');
    q<HTMLButtonElement>('flag-submit')!.click();
    await settle();
    expect(q('flag-dialog')?.textContent).toContain('You cannot flag your own content.');
    expect(q('flag-done')).toBeNull();
  });
});
