// @vitest-environment happy-dom
/**
 * The rich editor with uploads, as a page uses it: a pasted photo shows at once with its local
 * preview and progress, the writer is asked for its description, and once the server has it the
 * Markdown holds the uploaded image — never the preview. Cancel and refusals take the photo out
 * again and say why; a skipped description stays visible until it is given.
 */
import '../editor/vuetify-env';
import { mount, type VueWrapper } from '@vue/test-utils';
import type { Editor } from '@tiptap/vue-3';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { nextTick } from 'vue';
import { createVuetify } from 'vuetify';
import { fakeApi, settle } from '../errata/fake-api';
import { FakeXhr, installFakeXhr } from './client-fake-xhr';
import { anUpload } from './client-fixtures';
import RichEditor from '@/components/editor/RichEditor.vue';
import { configureHttp } from '@/composables/http';

let wrapper: VueWrapper | null = null;
let api: ReturnType<typeof fakeApi>;

beforeEach(() => {
  setActivePinia(createPinia());
  configureHttp({ csrfToken: () => 'token', refreshCsrf: async () => {}, onUnauthenticated: () => {} });
  installFakeXhr();
  api = fakeApi({
    'PATCH /api/uploads/12': (call) => ({ status: 200, body: anUpload(call.body as object) }),
    'PATCH /api/uploads/7': (call) => ({ status: 200, body: anUpload({ id: 7, ...(call.body as object) }) }),
  });
});
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  vi.unstubAllGlobals();
  document.body.innerHTML = '';
});

async function mountEditor(props: { modelValue: string; uploads?: { slug: string } } = { modelValue: '' }) {
  wrapper = mount(RichEditor, {
    props: { label: 'Text of Hardware', uploads: { slug: 'kiln-logger' }, ...props },
    global: { plugins: [createVuetify()] },
    attachTo: document.body,
  });
  await nextTick();
  const editor = (wrapper.vm as unknown as { editor: Editor | undefined }).editor;
  if (!editor) throw new Error('the editor did not start');
  return { wrapper, editor };
}

const markdownEmitted = (w: VueWrapper) => (w.emitted('update:modelValue') ?? []).map((args) => args[0] as string);
const uploadingEmitted = (w: VueWrapper) => (w.emitted('uploading') ?? []).map((args) => args[0] as boolean);

function pasteFiles(editor: Editor, ...files: File[]) {
  const data = new DataTransfer();
  for (const file of files) data.items.add(file);
  editor.view.dom.dispatchEvent(new ClipboardEvent('paste', { clipboardData: data, bubbles: true, cancelable: true }));
}

const photo = (name = 'bodge.jpg') => new File([new Uint8Array(4000)], name, { type: 'image/jpeg' });
const placeholder = () => document.querySelector<HTMLElement>('.rwb-upload-placeholder');
const progressbar = () => document.querySelector<HTMLElement>('[role="progressbar"]');
const dialog = () => document.querySelector<HTMLElement>('[data-testid="alt-text-dialog"]');
const button = (name: string) =>
  [...document.querySelectorAll<HTMLButtonElement>('button')].find(
    (b) => b.getAttribute('aria-label') === name || b.textContent?.trim() === name,
  );

async function type(input: HTMLInputElement, value: string) {
  input.value = value;
  input.dispatchEvent(new Event('input'));
  await nextTick();
}

describe('RichEditor with uploads', () => {
  it('shows a pasted photo at once, asks for its description, and saves the uploaded image in the Markdown', async () => {
    const { wrapper: w, editor } = await mountEditor({ modelValue: 'The relay board.' });
    editor.commands.setTextSelection(editor.state.doc.content.size - 1);
    pasteFiles(editor, photo());
    await settle();

    // The local preview is in the text right away, with the progress in words and as a bar.
    expect(placeholder()!.querySelector('img')!.getAttribute('src')).toMatch(/^blob:/);
    expect(placeholder()!.textContent).toContain('Uploading “bodge.jpg” — 0 %');
    expect(progressbar()!.getAttribute('aria-valuenow')).toBe('0');
    expect(uploadingEmitted(w)).toEqual([true]);

    FakeXhr.last.progress(2000, 4000);
    await nextTick();
    expect(progressbar()!.getAttribute('aria-valuenow')).toBe('50');
    expect(placeholder()!.textContent).toContain('50 %');

    // The description is asked for while the file uploads.
    expect(dialog()!.textContent).toContain('Describe the photo for readers who cannot see it');
    const [alt, caption] = [...dialog()!.querySelectorAll<HTMLInputElement>('input')];
    await type(alt!, 'Bodge wire from D7 to the relay input');
    await type(caption!, 'Rev A, top side');
    dialog()!.querySelector('form')!.dispatchEvent(new Event('submit'));
    await settle();
    expect(dialog()).toBeNull();

    FakeXhr.last.respond(201, { items: [anUpload({ id: 12 })] });
    await settle();

    expect(placeholder()).toBeNull();
    expect(editor.view.dom.querySelector('img')!.getAttribute('src')).toBe('/api/uploads/12/page.webp');
    expect(markdownEmitted(w).at(-1)).toBe(
      'The relay board.\n\n![Bodge wire from D7 to the relay input](/api/uploads/12/page.webp "Rev A, top side")',
    );
    expect(markdownEmitted(w).some((m) => m.includes('blob:'))).toBe(false);
    expect(api.writes()).toEqual([
      {
        method: 'PATCH',
        url: '/api/uploads/12',
        body: { altText: 'Bodge wire from D7 to the relay input', caption: 'Rev A, top side' },
      },
    ]);
    expect(uploadingEmitted(w)).toEqual([true, false]);
    expect((w.vm as unknown as { uploading: boolean }).uploading).toBe(false);
  });

  it('puts the description on the image when it comes after the upload finished', async () => {
    const { wrapper: w, editor } = await mountEditor();
    pasteFiles(editor, photo());
    await settle();
    FakeXhr.last.respond(201, { items: [anUpload({ id: 12 })] });
    await settle();
    expect(markdownEmitted(w).at(-1)).toBe('![](/api/uploads/12/page.webp)');

    await type(dialog()!.querySelector('input')!, 'Scope trace of the 3.3 V rail');
    dialog()!.querySelector('form')!.dispatchEvent(new Event('submit'));
    await settle();
    expect(markdownEmitted(w).at(-1)).toBe('![Scope trace of the 3.3 V rail](/api/uploads/12/page.webp)');
    expect(api.writes().map((c) => c.body)).toEqual([{ altText: 'Scope trace of the 3.3 V rail', caption: '' }]);
  });

  it('refuses an empty description but lets the writer skip, and then keeps the photo marked', async () => {
    const { wrapper: w, editor } = await mountEditor();
    pasteFiles(editor, photo());
    await settle();
    dialog()!.querySelector('form')!.dispatchEvent(new Event('submit'));
    await settle();
    expect(dialog()!.textContent).toContain('Describe the photo, or choose Skip to do it later.');

    button('Skip')!.click();
    await settle();
    expect(dialog()).toBeNull();
    FakeXhr.last.respond(201, { items: [anUpload({ id: 12 })] });
    await settle();

    expect(markdownEmitted(w).at(-1)).toBe('![](/api/uploads/12/page.webp)');
    expect(editor.view.dom.querySelector('img')!.classList.contains('rich-editor__image--no-alt')).toBe(true);
    const list = document.querySelector('[data-testid="missing-alt-list"]')!;
    expect(list.textContent).toContain('One photo has no alt text yet');
    expect(api.writes()).toEqual([]);

    // Described later, from the list beside the editor.
    button('Describe page.webp')!.click();
    await settle();
    await type(dialog()!.querySelector('input')!, 'Relay board, top side');
    dialog()!.querySelector('form')!.dispatchEvent(new Event('submit'));
    await settle();
    expect(markdownEmitted(w).at(-1)).toBe('![Relay board, top side](/api/uploads/12/page.webp)');
    expect(document.querySelector('[data-testid="missing-alt-list"]')).toBeNull();
    expect(api.writes().map((c) => [c.url, c.body])).toEqual([
      ['/api/uploads/12', { altText: 'Relay board, top side', caption: '' }],
    ]);
  });

  it('Cancel stops the upload and takes the photo out of the text', async () => {
    const { wrapper: w, editor } = await mountEditor({ modelValue: 'Text' });
    pasteFiles(editor, photo());
    await settle();
    button('Skip')!.click();
    await settle();
    const xhr = FakeXhr.last;
    button('Cancel adding bodge.jpg')!.click();
    await settle();
    expect(xhr.aborted).toBe(true);
    expect(placeholder()).toBeNull();
    expect(progressbar()).toBeNull();
    expect(markdownEmitted(w)).toEqual([]);
    expect(uploadingEmitted(w)).toEqual([true, false]);
  });

  it('takes a refused file out again and says why, in the server’s words', async () => {
    const { wrapper: w, editor } = await mountEditor({ modelValue: 'Text' });
    pasteFiles(editor, photo('huge.jpg'));
    await settle();
    FakeXhr.last.respond(413, { error: { code: 'payload_too_large', message: 'This file is 31 MB; the limit is 20 MB.' } });
    await settle();
    expect(placeholder()).toBeNull();
    expect(dialog()).toBeNull();
    expect(document.querySelector('[role="alert"]')!.textContent).toContain(
      '“huge.jpg” was not added: This file is 31 MB; the limit is 20 MB.',
    );
    expect(markdownEmitted(w)).toEqual([]);
    button('Dismiss huge.jpg')!.click();
    await settle();
    expect(document.querySelector('[role="alert"]')).toBeNull();
  });

  it('links an attachment at the cursor once it is uploaded, without asking for alt text', async () => {
    const { wrapper: w, editor } = await mountEditor({ modelValue: 'Schematic:' });
    editor.commands.setTextSelection(editor.state.doc.content.size - 1);
    pasteFiles(editor, new File(['%PDF-1.7'], 'schematic.pdf', { type: 'application/pdf' }));
    await settle();
    expect(dialog()).toBeNull();
    FakeXhr.last.respond(201, {
      items: [
        anUpload({
          id: 13,
          kind: 'attachment',
          mime: 'application/pdf',
          name: 'schematic.pdf',
          variants: [],
          url: '/api/uploads/13/original.pdf',
          markdownUrl: '/api/uploads/13/original.pdf',
        }),
      ],
    });
    await settle();
    expect(markdownEmitted(w).at(-1)).toBe('Schematic: [schematic.pdf](/api/uploads/13/original.pdf)');
  });

  it('asks for each photo in turn when several are pasted together, and keeps their order', async () => {
    const { wrapper: w, editor } = await mountEditor();
    pasteFiles(editor, photo('front.jpg'), photo('back.jpg'));
    await settle();
    expect(dialog()!.textContent).toContain('front.jpg · 1 more after this one');
    const [front, back] = FakeXhr.all;
    back!.respond(201, { items: [anUpload({ id: 21, markdownUrl: '/api/uploads/21/page.webp' })] });
    front!.respond(201, { items: [anUpload({ id: 20, markdownUrl: '/api/uploads/20/page.webp' })] });
    await settle();
    button('Skip')!.click();
    await settle();
    expect(dialog()!.textContent).toContain('back.jpg');
    button('Skip')!.click();
    await settle();
    expect(markdownEmitted(w).at(-1)).toBe('![](/api/uploads/20/page.webp)\n\n![](/api/uploads/21/page.webp)');
  });

  it('offers "Insert image or file" with a file picker only when it uploads', async () => {
    await mountEditor({ modelValue: '', uploads: { slug: 'kiln-logger' } });
    expect(button('Insert image or file')).toBeDefined();
    expect(button('Image from a web address')).toBeDefined();
    const picker = document.querySelector<HTMLInputElement>('input[type="file"]')!;
    expect(picker.multiple).toBe(true);
    const click = vi.spyOn(picker, 'click');
    button('Insert image or file')!.click();
    expect(click).toHaveBeenCalled();

    wrapper!.unmount();
    document.body.innerHTML = '';
    wrapper = mount(RichEditor, {
      props: { label: 'Text of Hardware', modelValue: '' },
      global: { plugins: [createVuetify()] },
      attachTo: document.body,
    });
    await nextTick();
    expect(button('Insert image or file')).toBeUndefined();
    expect(button('Image')).toBeDefined();
    expect(document.querySelector('input[type="file"]')).toBeNull();
  });

  it('uploads the files picked with the picker at the cursor', async () => {
    const { editor } = await mountEditor({ modelValue: 'Board' });
    editor.commands.setTextSelection(editor.state.doc.content.size - 1);
    const picker = document.querySelector<HTMLInputElement>('input[type="file"]')!;
    const data = new DataTransfer();
    data.items.add(photo('picked.jpg'));
    Object.defineProperty(picker, 'files', { value: data.files, configurable: true });
    picker.dispatchEvent(new Event('change'));
    await settle();
    expect(FakeXhr.last.url).toBe('/api/projects/kiln-logger/uploads');
    expect((FakeXhr.last.body!.get('file') as File).name).toBe('picked.jpg');
    expect(placeholder()!.textContent).toContain('picked.jpg');
  });

  it('whenUploadsSettled waits for every file', async () => {
    const { wrapper: w, editor } = await mountEditor();
    pasteFiles(editor, photo());
    await settle();
    const exposed = w.vm as unknown as { uploading: boolean; whenUploadsSettled: () => Promise<void> };
    expect(exposed.uploading).toBe(true);
    let done = false;
    void exposed.whenUploadsSettled().then(() => (done = true));
    await settle();
    expect(done).toBe(false);
    FakeXhr.last.respond(201, { items: [anUpload()] });
    await settle();
    expect(done).toBe(true);
    expect(markdownEmitted(w).at(-1)).toBe('![](/api/uploads/12/page.webp)');
  });
});
