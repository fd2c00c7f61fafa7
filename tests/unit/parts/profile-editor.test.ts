// @vitest-environment happy-dom
/**
 * Moderators correct a part as JSON: the editor checks the text against the shared profile
 * contract before anything is sent, keeps the part's slug, sends the correction on top of the
 * revision it opened, and shows the server's refusal (someone saved meanwhile) in words.
 */
import '../editor/vuetify-env';
import { flushPromises, mount, type VueWrapper } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { createVuetify } from 'vuetify';
import PartProfileEditor from '@/components/parts/PartProfileEditor.vue';
import { configureHttp } from '@/composables/http';
import { fakeApi, json, settle } from '../errata/fake-api';
import { partPage, profile } from './fixtures';

let wrapper: VueWrapper | null = null;
beforeEach(() => {
  setActivePinia(createPinia());
  configureHttp({ csrfToken: () => 'token', refreshCsrf: async () => {}, onUnauthenticated: () => {} });
});
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  vi.unstubAllGlobals();
  document.body.innerHTML = '';
});

function open() {
  wrapper = mount(PartProfileEditor, {
    props: { profile: profile('74hc'), baseRevision: 3 },
    global: { plugins: [createVuetify()] },
    attachTo: document.body,
  });
  return wrapper;
}
const setJson = async (w: VueWrapper, text: string) => {
  await w.get('[data-testid="profile-json"] textarea').setValue(text);
  await flushPromises();
};
const setNote = async (w: VueWrapper, text: string) => {
  await w.get('[data-testid="profile-note"] input').setValue(text);
  await flushPromises();
};

describe('correcting a part profile', { timeout: 30_000 }, () => {
  it('refuses broken JSON, an invalid profile and a changed slug before sending anything', async () => {
    const api = fakeApi({});
    const w = open();
    await setNote(w, 'Datasheet revision H');
    await setJson(w, '{ "slug": ');
    expect(w.get('[data-testid="profile-problem"]').text()).toMatch(/Not valid JSON/);
    const invalid = { ...profile('74hc'), supply: { ...profile('74hc').supply, minVolts: 7 } };
    await setJson(w, JSON.stringify(invalid));
    expect(w.get('[data-testid="profile-problem"]').text()).toMatch(/minVolts/);
    await setJson(w, JSON.stringify({ ...profile('74hc'), slug: '74hct' }));
    expect(w.get('[data-testid="profile-problem"]').text()).toContain('must stay "74hc"');
    expect(w.get('[data-testid="profile-save"]').attributes('disabled')).toBeDefined();
    expect(api.writes()).toEqual([]);
  });

  it('sends the corrected profile on top of the revision it opened, then reports it saved', async () => {
    const corrected = { ...profile('74hc'), summary: 'High-speed CMOS, corrected summary' };
    const api = fakeApi({ 'PUT /api/parts/74hc': json(partPage('74hc', { revision: 4 })) });
    const w = open();
    await setJson(w, JSON.stringify(corrected));
    await setNote(w, 'Summary from the family overview');
    await w.get('form').trigger('submit');
    await settle();
    expect(api.writes()).toEqual([
      expect.objectContaining({
        method: 'PUT',
        body: {
          profile: expect.objectContaining({ slug: '74hc', summary: 'High-speed CMOS, corrected summary' }),
          baseRevision: 3,
          note: 'Summary from the family overview',
        },
      }),
    ]);
    expect((w.emitted('saved')![0]![0] as { revision: number }).revision).toBe(4);
  });

  it('shows the refusal when someone saved a newer revision meanwhile, and keeps the text', async () => {
    fakeApi({
      'PUT /api/parts/74hc': () => ({
        status: 409,
        body: {
          error: {
            code: 'edit_conflict',
            message: 'Someone saved revision 4 of 74HC while you were editing revision 3.',
          },
        },
      }),
    });
    const w = open();
    await setNote(w, 'A typo in the VIL row');
    await w.get('form').trigger('submit');
    await settle();
    expect(w.get('[data-testid="profile-server-error"]').text()).toContain('Someone saved revision 4');
    expect(JSON.parse((w.get('[data-testid="profile-json"] textarea').element as HTMLTextAreaElement).value).slug).toBe(
      '74hc',
    );
    expect(w.emitted('saved')).toBeUndefined();
  });
});
