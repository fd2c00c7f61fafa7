// @vitest-environment happy-dom
/**
 * The leave guard (app/composables/leave-guard.ts) and the draft notice that goes with it.
 */
import './vuetify-env';
import { flushPromises, mount, type VueWrapper } from '@vue/test-utils';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { defineComponent, h, ref } from 'vue';
import { createMemoryHistory, createRouter, RouterView } from 'vue-router';
import { createVuetify } from 'vuetify';
import DraftNotice from '@/components/editor/DraftNotice.vue';
import { LEAVE_MESSAGE, useLeaveGuard } from '@/composables/leave-guard';

const dirty = ref(false);

const Editing = defineComponent({
  setup() {
    useLeaveGuard(() => dirty.value);
    return () => h('p', 'editing');
  },
});

let wrapper: VueWrapper | null = null;

/** happy-dom has no `window.confirm`; the guard's default asks through it. */
function stubConfirm(answer: boolean) {
  const confirm = vi.fn((_message?: string) => answer);
  Object.defineProperty(window, 'confirm', { value: confirm, configurable: true, writable: true });
  return confirm;
}

afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  dirty.value = false;
  vi.restoreAllMocks();
  Reflect.deleteProperty(window, 'confirm');
});

async function mountAt(path: string) {
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/edit/:id', component: Editing },
      { path: '/elsewhere', component: { render: () => h('p', 'elsewhere') } },
    ],
  });
  await router.push(path);
  wrapper = mount(RouterView, { global: { plugins: [router] } });
  await flushPromises();
  return router;
}

describe('useLeaveGuard', () => {
  it('lets the writer leave without asking when nothing is unsaved', async () => {
    const confirm = stubConfirm(true);
    const router = await mountAt('/edit/1');
    await router.push('/elsewhere');
    expect(router.currentRoute.value.path).toBe('/elsewhere');
    expect(confirm).not.toHaveBeenCalled();
  });

  it('asks before leaving unsaved changes, and stays when the writer says no', async () => {
    const confirm = stubConfirm(false);
    const router = await mountAt('/edit/1');
    dirty.value = true;
    await router.push('/elsewhere');
    expect(confirm).toHaveBeenCalledWith(LEAVE_MESSAGE);
    expect(LEAVE_MESSAGE).toBe('Leave without saving? Your changes stay as a draft in this browser.');
    expect(router.currentRoute.value.path).toBe('/edit/1');
  });

  it('leaves when the writer confirms', async () => {
    stubConfirm(true);
    const router = await mountAt('/edit/1');
    dirty.value = true;
    await router.push('/elsewhere');
    expect(router.currentRoute.value.path).toBe('/elsewhere');
  });

  it('asks too when the same page switches to another document', async () => {
    const confirm = stubConfirm(false);
    const router = await mountAt('/edit/1');
    dirty.value = true;
    await router.push('/edit/2');
    expect(confirm).toHaveBeenCalledTimes(1);
    expect(router.currentRoute.value.path).toBe('/edit/1');
    await router.push('/edit/1?tab=preview');
    expect(confirm).toHaveBeenCalledTimes(1);
    expect(router.currentRoute.value.fullPath).toBe('/edit/1?tab=preview');
  });

  it('holds the tab open with the browser prompt only while something is unsaved', async () => {
    await mountAt('/edit/1');
    const clean = new Event('beforeunload', { cancelable: true });
    window.dispatchEvent(clean);
    expect(clean.defaultPrevented).toBe(false);
    dirty.value = true;
    const unsaved = new Event('beforeunload', { cancelable: true });
    window.dispatchEvent(unsaved);
    expect(unsaved.defaultPrevented).toBe(true);
  });

  it('stops prompting once the editing page is gone', async () => {
    const router = await mountAt('/edit/1');
    stubConfirm(true);
    dirty.value = true;
    await router.push('/elsewhere');
    const later = new Event('beforeunload', { cancelable: true });
    window.dispatchEvent(later);
    expect(later.defaultPrevented).toBe(false);
  });
});

describe('DraftNotice', () => {
  it('says when the draft is from and hands Restore and Discard to the page', async () => {
    const notice = mount(DraftNotice, {
      props: { savedAt: '2026-03-13T20:00:00.000Z', olderRevision: 2 },
      global: { plugins: [createVuetify()] },
    });
    expect(notice.text()).toContain('An unsaved draft from');
    expect(notice.find('time').attributes('datetime')).toBe('2026-03-13T20:00:00.000Z');
    expect(notice.text()).toContain('revision 2');
    const [restore, discard] = notice.findAll('button');
    await restore!.trigger('click');
    await discard!.trigger('click');
    expect(notice.emitted('restore')).toHaveLength(1);
    expect(notice.emitted('discard')).toHaveLength(1);
    notice.unmount();
  });
});
