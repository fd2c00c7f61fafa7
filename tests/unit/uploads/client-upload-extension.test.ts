// @vitest-environment happy-dom
/**
 * The editor side of uploads: a pasted or dropped file reaches the upload code with its place in
 * the text, a placeholder with the local preview shows there (and never in the Markdown), and
 * when the upload is ready it becomes the image at that place — in the order the files came,
 * whichever finishes first.
 */
import { Editor } from '@tiptap/core';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { editorExtensions } from '@/components/editor/markdown-extensions';
import {
  addPlaceholders,
  attachmentLink,
  describeImages,
  imagesWithoutAlt,
  NO_ALT_TITLE,
  placeholders,
  removePlaceholder,
  replacePlaceholder,
  setPlaceholderProgress,
  UploadFiles,
} from '@/components/editor/upload-extension';

const editors: Editor[] = [];
afterEach(() => {
  while (editors.length) editors.pop()!.destroy();
  document.body.innerHTML = '';
});

function start(markdown: string, onFiles = vi.fn()) {
  const element = document.createElement('div');
  document.body.append(element);
  const editor = new Editor({
    element,
    extensions: [...editorExtensions(), UploadFiles.configure({ onFiles })],
    content: markdown,
    contentType: 'markdown',
  });
  editors.push(editor);
  return { editor, onFiles };
}

/** The position just after the first occurrence of `text`. */
function after(editor: Editor, text: string): number {
  let found = -1;
  editor.state.doc.descendants((node, pos) => {
    if (found >= 0 || !node.isText) return;
    const at = node.text!.indexOf(text);
    if (at >= 0) found = pos + at + text.length;
  });
  if (found < 0) throw new Error(`"${text}" is not in the document`);
  return found;
}

const photo = (name = 'board.jpg') => new File([new Uint8Array([0xff, 0xd8, 0xff])], name, { type: 'image/jpeg' });

function paste(editor: Editor, data: DataTransfer) {
  const event = new ClipboardEvent('paste', { clipboardData: data, bubbles: true, cancelable: true });
  editor.view.dom.dispatchEvent(event);
  return event;
}

const widgets = (editor: Editor) => [...editor.view.dom.querySelectorAll<HTMLElement>('.rwb-upload-placeholder')];

describe('pasting and dropping files', () => {
  it('hands pasted files to the upload code with the cursor position, and keeps them out of the text', () => {
    const { editor, onFiles } = start('Wiring notes');
    editor.commands.setTextSelection(after(editor, 'Wiring'));
    const data = new DataTransfer();
    data.items.add(photo('scope.jpg'));
    data.items.add(photo('bodge.jpg'));
    const event = paste(editor, data);

    expect(onFiles).toHaveBeenCalledTimes(1);
    const [files, pos] = onFiles.mock.calls[0]!;
    expect((files as File[]).map((f) => f.name)).toEqual(['scope.jpg', 'bodge.jpg']);
    expect(pos).toBe(after(editor, 'Wiring'));
    expect(event.defaultPrevented).toBe(true);
    expect(editor.getMarkdown()).toBe('Wiring notes');
  });

  it('leaves a paste without files to the editor (text is pasted as usual)', () => {
    const { editor, onFiles } = start('Wiring');
    editor.commands.setTextSelection(after(editor, 'Wiring'));
    const data = new DataTransfer();
    data.setData('text/plain', ' and power');
    paste(editor, data);
    expect(onFiles).not.toHaveBeenCalled();
    expect(editor.getMarkdown()).toBe('Wiring and power');
  });

  it('a paste over selected text replaces the selection with the file', () => {
    const { editor, onFiles } = start('Put the photo HERE please');
    const end = after(editor, 'HERE');
    editor.commands.setTextSelection({ from: end - 4, to: end });
    const data = new DataTransfer();
    data.items.add(photo());
    paste(editor, data);
    expect(editor.getMarkdown()).toBe('Put the photo  please');
    expect(onFiles.mock.calls[0]![1]).toBe(end - 4);
  });

  it('hands dropped files to the upload code', () => {
    const { editor, onFiles } = start('Drop here');
    const data = new DataTransfer();
    data.items.add(new File(['%PDF-1.7'], 'schematic.pdf', { type: 'application/pdf' }));
    const drop = new DragEvent('drop', { clientX: 0, clientY: 0 });
    // happy-dom's DragEvent ignores `dataTransfer` in its init dictionary.
    Object.defineProperty(drop, 'dataTransfer', { value: data });
    const handled = editor.view.someProp('handleDrop', (f) => f(editor.view, drop, editor.state.doc.slice(0, 0), false));
    expect(handled).toBe(true);
    expect((onFiles.mock.calls[0]![0] as File[])[0]!.name).toBe('schematic.pdf');
    expect(typeof onFiles.mock.calls[0]![1]).toBe('number');
  });

  it('takes no files while the editor is read-only', () => {
    const { editor, onFiles } = start('Locked');
    editor.setEditable(false);
    const data = new DataTransfer();
    data.items.add(photo());
    paste(editor, data);
    expect(onFiles).not.toHaveBeenCalled();
  });
});

describe('placeholders', () => {
  it('shows the local preview and the progress where the file goes, without touching the Markdown', () => {
    const { editor } = start('First paragraph\n\nSecond paragraph');
    const pos = after(editor, 'First paragraph');
    addPlaceholders(editor, [{ key: 'upload-1', kind: 'image', name: 'board.jpg', previewUrl: 'blob:local/1' }], pos);

    const [widget] = widgets(editor);
    expect(widget!.querySelector('img')!.getAttribute('src')).toBe('blob:local/1');
    expect(widget!.textContent).toContain('Uploading “board.jpg” — 0 %');
    // The widget sits inside the first paragraph, at the end of its text.
    expect(widget!.closest('p')!.textContent).toContain('First paragraph');

    setPlaceholderProgress(editor, 'upload-1', 0.42);
    const [same] = widgets(editor);
    expect(same).toBe(widget); // updated in place, the preview is not redrawn
    expect(same!.textContent).toContain('42 %');

    expect(editor.getMarkdown()).toBe('First paragraph\n\nSecond paragraph');
    expect(editor.getMarkdown()).not.toContain('blob:');
    expect(JSON.stringify(editor.getJSON())).not.toContain('blob:');
  });

  it('becomes the uploaded image at its place, with alt text and caption in the Markdown', () => {
    const { editor } = start('Before\n\nAfter');
    addPlaceholders(editor, [{ key: 'upload-1', kind: 'image', name: 'board.jpg', previewUrl: 'blob:local/1' }], after(editor, 'Before') + 1);

    const placed = replacePlaceholder(editor, 'upload-1', {
      type: 'image',
      attrs: { src: '/api/uploads/12/page.webp', alt: 'Bodge wire from D7 to the relay input', title: 'Rev A, top side' },
    });

    expect(placed).toBe(true);
    expect(widgets(editor)).toHaveLength(0);
    expect(placeholders(editor.state)).toEqual([]);
    expect(editor.getMarkdown()).toBe(
      'Before\n\n![Bodge wire from D7 to the relay input](/api/uploads/12/page.webp "Rev A, top side")\n\nAfter',
    );
    expect(editor.view.dom.querySelector('img')!.getAttribute('src')).toBe('/api/uploads/12/page.webp');
  });

  it('puts an image dropped in the middle of a sentence between its two halves', () => {
    const { editor } = start('The relay clicks then resets.');
    addPlaceholders(editor, [{ key: 'k', kind: 'image', name: 'a.jpg', previewUrl: 'blob:a' }], after(editor, 'clicks'));
    replacePlaceholder(editor, 'k', { type: 'image', attrs: { src: '/api/uploads/3/page.webp', alt: 'Relay', title: null } });
    // The space at the split goes: a paragraph cannot start with one in Markdown.
    expect(editor.getMarkdown()).toBe('The relay clicks\n\n![Relay](/api/uploads/3/page.webp)\n\nthen resets.');
  });

  it.each([
    { where: 'a list item', markdown: '- relay on D7\n- sensor on D2', inside: 'relay' },
    { where: 'a table cell', markdown: '| Pin | Use |\n|---|---|\n| D7 | relay |', inside: 'D7' },
    { where: 'a heading', markdown: '## Wiring and power\n\nText', inside: 'Wiring' },
    { where: 'a code block', markdown: '```c\nint relay = 7;\n```', inside: 'relay' },
    { where: 'a quote', markdown: '> Watch the relay\n\nText', inside: 'Watch' },
  ])('puts an image pasted into $where after that block, where Markdown can hold it', ({ markdown, inside }) => {
    const { editor } = start(markdown);
    const block = markdown.split('\n\n')[0]!;
    addPlaceholders(editor, [{ key: 'k', kind: 'image', name: 'a.jpg', previewUrl: 'blob:a' }], after(editor, inside));
    replacePlaceholder(editor, 'k', { type: 'image', attrs: { src: '/api/uploads/4/page.webp', alt: 'Relay' } });
    expect(editor.getMarkdown().startsWith(`${block}\n\n![Relay](/api/uploads/4/page.webp)`)).toBe(true);
  });

  it('keeps files in the order they were added when a later one finishes first', () => {
    const { editor } = start('Photos:\n\nEnd');
    const at = after(editor, 'Photos:') + 1;
    addPlaceholders(
      editor,
      ['one', 'two', 'three'].map((n) => ({ key: n, kind: 'image' as const, name: `${n}.jpg`, previewUrl: `blob:${n}` })),
      at,
    );
    const image = (n: string) => ({ type: 'image', attrs: { src: `/api/uploads/${n}/page.webp`, alt: n } });
    replacePlaceholder(editor, 'two', image('two'));
    replacePlaceholder(editor, 'three', image('three'));
    replacePlaceholder(editor, 'one', image('one'));
    const srcs: string[] = [];
    editor.state.doc.descendants((node) => {
      if (node.type.name === 'image') srcs.push(String(node.attrs.alt));
    });
    expect(srcs).toEqual(['one', 'two', 'three']);
  });

  it('stays before text the writer types at its place while it uploads', () => {
    const { editor } = start('Start');
    const pos = after(editor, 'Start');
    editor.commands.setTextSelection(pos);
    addPlaceholders(editor, [{ key: 'k', kind: 'image', name: 'a.jpg', previewUrl: 'blob:a' }], pos);
    editor.commands.insertContent(' typed meanwhile');
    expect(placeholders(editor.state)[0]!.pos).toBe(pos);
    replacePlaceholder(editor, 'k', { type: 'image', attrs: { src: '/api/uploads/5/page.webp', alt: 'Board' } });
    expect(editor.getMarkdown()).toBe('Start\n\n![Board](/api/uploads/5/page.webp)\n\ntyped meanwhile');
  });

  it('moves with the text when the writer edits above it', () => {
    const { editor } = start('Top\n\nBottom');
    const pos = after(editor, 'Bottom');
    addPlaceholders(editor, [{ key: 'k', kind: 'image', name: 'a.jpg', previewUrl: 'blob:a' }], pos);
    editor.commands.insertContentAt(1, 'New ');
    expect(placeholders(editor.state)[0]!.pos).toBe(pos + 4);
  });

  it('goes without a trace when the upload is cancelled or fails', () => {
    const { editor } = start('Text');
    addPlaceholders(editor, [{ key: 'k', kind: 'image', name: 'a.jpg', previewUrl: 'blob:a' }], after(editor, 'Text'));
    removePlaceholder(editor, 'k');
    expect(widgets(editor)).toHaveLength(0);
    expect(replacePlaceholder(editor, 'k', { type: 'image', attrs: { src: '/x' } })).toBe(false);
    expect(editor.getMarkdown()).toBe('Text');
  });

  it('is not an undo step: undo after an upload takes back the image, not the placeholder', () => {
    const { editor } = start('Text');
    addPlaceholders(editor, [{ key: 'k', kind: 'image', name: 'a.jpg', previewUrl: 'blob:a' }], after(editor, 'Text'));
    setPlaceholderProgress(editor, 'k', 0.5);
    expect(editor.can().undo()).toBe(false);
    replacePlaceholder(editor, 'k', { type: 'image', attrs: { src: '/api/uploads/1/page.webp', alt: 'A' } });
    editor.commands.undo();
    expect(editor.getMarkdown()).toBe('Text');
  });
});

describe('attachments', () => {
  it('become a link at the cursor, spaced from the words around it', () => {
    const { editor } = start('See the files');
    const pos = after(editor, 'See the');
    addPlaceholders(editor, [{ key: 'k', kind: 'file', name: 'schematic.pdf', previewUrl: null }], pos);
    expect(widgets(editor)[0]!.querySelector('img')).toBeNull();
    replacePlaceholder(editor, 'k', attachmentLink(editor.state, pos, 'schematic.pdf', '/api/uploads/13/schematic.pdf'));
    expect(editor.getMarkdown()).toBe('See the [schematic.pdf](/api/uploads/13/schematic.pdf) files');
  });

  it('two attachments added together are two links in their order', () => {
    const { editor } = start('Files:');
    const pos = after(editor, 'Files:');
    addPlaceholders(
      editor,
      [
        { key: 'a', kind: 'file', name: 'gerbers.zip', previewUrl: null },
        { key: 'b', kind: 'file', name: 'bom.csv', previewUrl: null },
      ],
      pos,
    );
    const place = (key: string, name: string, id: number) => {
      const at = placeholders(editor.state).find((p) => p.key === key)!.pos;
      replacePlaceholder(editor, key, attachmentLink(editor.state, at, name, `/api/uploads/${id}/${name}`));
    };
    place('b', 'bom.csv', 21);
    place('a', 'gerbers.zip', 20);
    expect(editor.getMarkdown()).toBe('Files: [gerbers.zip](/api/uploads/20/gerbers.zip) [bom.csv](/api/uploads/21/bom.csv)');
  });
});

describe('images without alt text', () => {
  it('are marked in the editor and listed once per address, with the upload behind them', () => {
    const { editor } = start(
      '![](/api/uploads/7/page.webp)\n\n![Described](/api/uploads/8/page.webp)\n\n![](https://example.org/x.png "Scope")\n\n![](/api/uploads/7/page.webp)',
    );
    const marked = [...editor.view.dom.querySelectorAll('img.rich-editor__image--no-alt')];
    expect(marked).toHaveLength(3);
    expect(marked[0]!.getAttribute('title')).toBe(NO_ALT_TITLE);
    expect(imagesWithoutAlt(editor.state.doc)).toEqual([
      { src: '/api/uploads/7/page.webp', uploadId: 7, title: '' },
      { src: 'https://example.org/x.png', uploadId: null, title: 'Scope' },
    ]);
  });

  it('get their description on every use of that image that still lacks one', () => {
    const { editor } = start('![](/api/uploads/7/page.webp)\n\n![Kept](/api/uploads/7/page.webp)');
    expect(describeImages(editor, '/api/uploads/7/page.webp', { alt: 'Scope trace of the 3.3 V rail', title: 'At 400 mA' })).toBe(
      true,
    );
    expect(editor.getMarkdown()).toBe(
      '![Scope trace of the 3.3 V rail](/api/uploads/7/page.webp "At 400 mA")\n\n![Kept](/api/uploads/7/page.webp)',
    );
    expect(editor.view.dom.querySelectorAll('img.rich-editor__image--no-alt')).toHaveLength(0);
  });
});
