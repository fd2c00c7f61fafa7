// @vitest-environment happy-dom
/** Following a project: a toggle button that says its state with aria-pressed. */
import '../editor/vuetify-env';
import { flushPromises, mount, type VueWrapper } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { createVuetify } from 'vuetify';
import ProjectFollowButton from '@/components/projects/ProjectFollowButton.vue';
import { useSessionStore } from '@/stores/session';
import { fakeServer, ok, people, signedInAs } from '../proposals/fake-server';

const API = '/api/projects/greenhouse-vent/follow';

let wrapper: VueWrapper | null = null;
beforeEach(() => setActivePinia(createPinia()));
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  vi.unstubAllGlobals();
});

async function mountButton() {
  wrapper = mount(ProjectFollowButton, { props: { slug: 'greenhouse-vent' }, global: { plugins: [createVuetify()] } });
  await flushPromises();
  return wrapper;
}

describe('ProjectFollowButton', () => {
  it('offers sign-in to a signed-out visitor and asks the server nothing', async () => {
    const server = fakeServer({});
    const button = await mountButton();
    expect(button.get('[data-testid="follow-sign-in"]').text()).toBe('Sign in to follow');
    expect(server.calls).toHaveLength(0);
  });

  it('toggles following with PUT and DELETE, and says the state with aria-pressed', async () => {
    useSessionStore().user = signedInAs(people.contributor);
    const server = fakeServer({
      [`GET ${API}`]: ok({ following: false }),
      [`PUT ${API}`]: ok({ following: true }),
      [`DELETE ${API}`]: ok({ following: false }),
    });
    const w = await mountButton();
    const button = () => w.get('[data-testid="follow"]');
    expect(button().attributes('aria-pressed')).toBe('false');
    expect(button().text()).toBe('Follow');

    await button().trigger('click');
    await flushPromises();
    expect(button().attributes('aria-pressed')).toBe('true');
    expect(button().text()).toBe('Following');

    await button().trigger('click');
    await flushPromises();
    expect(button().attributes('aria-pressed')).toBe('false');
    expect(server.writes().map((c) => c.method)).toEqual(['PUT', 'DELETE']);
  });
});
