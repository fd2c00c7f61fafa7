// @vitest-environment happy-dom
/**
 * The editor component as a page uses it: v-model of Markdown, the toolbar, the dialogs.
 */
import './vuetify-env';
import { mount, type VueWrapper } from '@vue/test-utils';
import type { Editor } from '@tiptap/vue-3';
import { afterEach, describe, expect, it } from 'vitest';
import { nextTick } from 'vue';
import { createVuetify } from 'vuetify';
import RichEditor from '@/components/editor/RichEditor.vue';

let wrapper: VueWrapper | null = null;

afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  document.body.innerHTML = '';
});

async function mountEditor(props: { modelValue: string; disabled?: boolean }) {
  wrapper = mount(RichEditor, {
    props: { label: 'Text of Hardware', ...props },
    global: { plugins: [createVuetify()] },
    attachTo: document.body,
  });
  await nextTick();
  const editor = (wrapper.vm as unknown as { editor: Editor | undefined }).editor;
  if (!editor) throw new Error('the editor did not start');
  return { wrapper, editor };
}

function selectWord(editor: Editor, word: string) {
  let range: { from: number; to: number } | null = null;
  editor.state.doc.descendants((node, pos) => {
    if (range || !node.isText) return;
    const at = node.text!.indexOf(word);
    if (at >= 0) range = { from: pos + at, to: pos + at + word.length };
  });
  if (!range) throw new Error(`"${word}" is not in the document`);
  editor.commands.setTextSelection(range);
}

const button = (label: string) => document.querySelector<HTMLButtonElement>(`button[aria-label="${label}"]`)!;

function emitted(w: VueWrapper): string[] {
  return (w.emitted('update:modelValue') ?? []).map((args) => args[0] as string);
}

describe('RichEditor', () => {
  it('names its editing surface and its toolbar for assistive technology', async () => {
    await mountEditor({ modelValue: 'Hello' });
    const surface = document.querySelector('[contenteditable]')!;
    expect(surface.getAttribute('role')).toBe('textbox');
    expect(surface.getAttribute('aria-label')).toBe('Text of Hardware');
    expect(surface.getAttribute('aria-multiline')).toBe('true');
    expect(surface.classList.contains('reading')).toBe(true);
    expect(document.querySelector('[role="toolbar"]')!.getAttribute('aria-label')).toBe(
      'Formatting for Text of Hardware',
    );
  });

  it('emits Markdown when a toolbar button changes the text, and shows the mark as pressed', async () => {
    const { wrapper: w, editor } = await mountEditor({ modelValue: 'Check the fuse first.' });
    selectWord(editor, 'fuse');
    await nextTick();
    expect(button('Bold').getAttribute('aria-pressed')).toBe('false');
    button('Bold').click();
    await nextTick();
    expect(emitted(w)).toEqual(['Check the **fuse** first.']);
    expect(button('Bold').getAttribute('aria-pressed')).toBe('true');
  });

  it('replaces its content when modelValue changes from outside, without emitting it back', async () => {
    const { wrapper: w, editor } = await mountEditor({ modelValue: 'Draft one' });
    await w.setProps({ modelValue: '## Restored\n\n- from the draft' });
    expect(editor.getMarkdown()).toBe('## Restored\n\n- from the draft');
    expect(w.emitted('update:modelValue')).toBeUndefined();
  });

  it('does not reload what it emitted itself, so the cursor stays where the writer is', async () => {
    const { wrapper: w, editor } = await mountEditor({ modelValue: 'Power rail' });
    editor.commands.setTextSelection(7); // after "Power "
    editor.commands.insertContent('3.3 V ');
    const [markdown] = emitted(w);
    expect(markdown).toBe('Power 3.3 V rail');
    const cursor = editor.state.selection.from;
    await w.setProps({ modelValue: markdown });
    expect(editor.state.selection.from).toBe(cursor);
    expect(emitted(w)).toHaveLength(1);
  });

  it('is read-only and its toolbar is off while disabled', async () => {
    const { editor } = await mountEditor({ modelValue: 'Locked', disabled: true });
    expect(editor.isEditable).toBe(false);
    expect(button('Bold').disabled).toBe(true);
    expect(document.querySelector('[contenteditable]')!.getAttribute('aria-readonly')).toBe('true');
  });

  it('moves between toolbar buttons with the arrow keys and keeps one tab stop', async () => {
    await mountEditor({ modelValue: 'Text' });
    await nextTick();
    const toolbar = document.querySelector<HTMLElement>('[role="toolbar"]')!;
    const tabbable = () =>
      [...toolbar.querySelectorAll<HTMLElement>('[data-toolbar-item]')].filter((el) => el.tabIndex === 0);
    expect(tabbable()).toHaveLength(1);
    const bold = button('Bold');
    bold.focus();
    bold.dispatchEvent(new KeyboardEvent('keydown', { key: 'ArrowRight', bubbles: true }));
    expect(document.activeElement).toBe(button('Italic'));
    expect(tabbable()).toEqual([button('Italic')]);
  });

  it('refuses a script link with a message and adds a web link', async () => {
    const { wrapper: w, editor } = await mountEditor({ modelValue: 'See the notes.' });
    selectWord(editor, 'notes');
    button('Link').click();
    await nextTick();
    await nextTick();
    const input = document.querySelector<HTMLInputElement>('.v-dialog input')!;
    input.value = 'javascript:alert(1)';
    input.dispatchEvent(new Event('input'));
    await nextTick();
    expect(document.querySelector('.v-dialog')!.textContent).toContain(
      'Links to "javascript:" addresses are not allowed',
    );
    input.value = 'https://example.org/notes';
    input.dispatchEvent(new Event('input'));
    await nextTick();
    document.querySelector<HTMLFormElement>('.v-dialog form')!.requestSubmit();
    await nextTick();
    expect(emitted(w).at(-1)).toBe('See the [notes](https://example.org/notes).');
  });

  it('will not add an image without alt text', async () => {
    const { wrapper: w } = await mountEditor({ modelValue: 'Board photo:' });
    button('Image').click();
    await nextTick();
    await nextTick();
    const [src, alt] = [...document.querySelectorAll<HTMLInputElement>('.v-dialog input')];
    src!.value = 'https://example.org/rev-a.jpg';
    src!.dispatchEvent(new Event('input'));
    await nextTick();
    const form = document.querySelector<HTMLFormElement>('.v-dialog form')!;
    form.requestSubmit();
    await nextTick();
    expect(document.querySelector('.v-dialog')!.textContent).toContain('Describe what the image shows');
    expect(w.emitted('update:modelValue')).toBeUndefined();
    alt!.value = 'Rev A board, top side';
    alt!.dispatchEvent(new Event('input'));
    await nextTick();
    form.requestSubmit();
    await nextTick();
    expect(emitted(w).at(-1)).toContain('![Rev A board, top side](https://example.org/rev-a.jpg)');
  });

  it('lists the keyboard shortcuts in its help', async () => {
    await mountEditor({ modelValue: 'Text' });
    button('Keyboard shortcuts').click();
    await nextTick();
    await nextTick();
    const help = document.querySelector('.rich-editor-toolbar__shortcuts')!;
    expect(help.textContent).toContain('Bold');
    expect(help.textContent).toMatch(/Ctrl\+B|⌘B/);
    expect(help.textContent).toContain('Task list');
  });
});
