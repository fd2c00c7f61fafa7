// @vitest-environment happy-dom
/**
 * Errata carry photos too: with the project's slug, each of the erratum's four texts takes
 * files, and the form says while any of them is still uploading. Without it (proposals, whose
 * authors cannot upload) the texts take none.
 */
import '../editor/vuetify-env';
import type { ErratumFieldsInput } from '@shared/contracts/errata';
import { mount, type VueWrapper } from '@vue/test-utils';
import type { Editor } from '@tiptap/vue-3';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { nextTick } from 'vue';
import { createVuetify } from 'vuetify';
import { settle } from '../errata/fake-api';
import { FakeXhr, installFakeXhr } from './client-fake-xhr';
import { anUpload } from './client-fixtures';
import RichEditor from '@/components/editor/RichEditor.vue';
import ErratumForm from '@/components/errata/ErratumForm.vue';
import { blankErratumFields } from '@/components/errata/fields';
import { configureHttp } from '@/composables/http';

let wrapper: VueWrapper | null = null;
beforeEach(() => {
  setActivePinia(createPinia());
  configureHttp({ csrfToken: () => 'token', refreshCsrf: async () => {}, onUnauthenticated: () => {} });
  installFakeXhr();
});
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  vi.unstubAllGlobals();
  document.body.innerHTML = '';
});

async function mountForm(slug?: string) {
  wrapper = mount(ErratumForm, {
    props: {
      modelValue: blankErratumFields(),
      'onUpdate:modelValue': (value: ErratumFieldsInput) => wrapper!.setProps({ modelValue: value }),
      boards: [{ id: 1, label: 'Rev A' }],
      categories: [{ slug: 'power', name: 'Power' }],
      ...(slug ? { slug } : {}),
    },
    global: { plugins: [createVuetify()] },
    attachTo: document.body,
  });
  await nextTick();
  return wrapper;
}

const uploadButtons = () =>
  [...document.querySelectorAll('button')].filter((b) => b.getAttribute('aria-label') === 'Insert image or file');

// Four rich editors and a dozen Vuetify fields take a few seconds to mount under happy-dom.
describe('ErratumForm with uploads', { timeout: 20_000 }, () => {
  it('offers files in each of its four texts when it knows the project', async () => {
    await mountForm('kiln-logger');
    expect(uploadButtons()).toHaveLength(4);
  });

  it('offers none without the project (proposals)', async () => {
    await mountForm();
    expect(uploadButtons()).toHaveLength(0);
  });

  it('says while a text is uploading, and the photo lands in that text', async () => {
    const w = await mountForm('kiln-logger');
    const editors = w.findAllComponents(RichEditor);
    const workaround = (editors[2]!.vm as unknown as { editor: Editor }).editor;
    const data = new DataTransfer();
    data.items.add(new File([new Uint8Array(100)], 'bodge.jpg', { type: 'image/jpeg' }));
    workaround.view.dom.dispatchEvent(new ClipboardEvent('paste', { clipboardData: data, bubbles: true, cancelable: true }));
    await settle();
    expect(FakeXhr.last.url).toBe('/api/projects/kiln-logger/uploads');
    expect(w.emitted('uploading')).toEqual([[true]]);

    let settled = false;
    void (w.vm as unknown as { whenUploadsSettled: () => Promise<void> }).whenUploadsSettled().then(() => (settled = true));
    await settle();
    expect(settled).toBe(false);

    FakeXhr.last.respond(201, { items: [anUpload({ id: 12 })] });
    await settle();
    expect(settled).toBe(true);
    expect(w.emitted('uploading')).toEqual([[true], [false]]);
    expect((w.props() as { modelValue: ErratumFieldsInput }).modelValue.workaround).toBe('![](/api/uploads/12/page.webp)');
    expect((w.props() as { modelValue: ErratumFieldsInput }).modelValue.symptom).toBe('');
  });
});
