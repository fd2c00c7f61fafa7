// @vitest-environment happy-dom
/**
 * Uploaded photos and attachments in the stored Markdown: `![alt](/api/uploads/<id>/page.webp
 * "caption")` and `[name](/api/uploads/<id>/original.<ext>)` come back from the editor byte for
 * byte, and what the upload code writes into the editor reads back the same.
 */
import { Editor } from '@tiptap/core';
import { afterEach, describe, expect, it } from 'vitest';
import { renderMarkdown } from '../../../api/markdown/render';
import { editorExtensions } from '@/components/editor/markdown-extensions';
import { addPlaceholders, describeImages, replacePlaceholder, UploadFiles } from '@/components/editor/upload-extension';

const editors: Editor[] = [];
afterEach(() => {
  while (editors.length) editors.pop()!.destroy();
});

function load(markdown: string, withUploads = false): Editor {
  const extensions = editorExtensions();
  if (withUploads) extensions.push(UploadFiles);
  const editor = new Editor({ extensions, content: markdown, contentType: 'markdown' });
  editors.push(editor);
  return editor;
}

const roundTrip = (markdown: string) => load(markdown).getMarkdown();

const canonical = [
  {
    name: 'an uploaded photo with alt text and a caption',
    markdown: '![Bodge wire from D7 to the relay input](/api/uploads/12/page.webp "Rev A, top side")',
  },
  { name: 'an uploaded photo without alt text', markdown: '![](/api/uploads/12/page.webp)' },
  {
    name: 'a caption with quotes and a backslash',
    markdown: '![Scope trace](/api/uploads/7/page.webp "The \\"before\\" trace, C:\\\\scope")',
  },
  { name: 'alt text with brackets', markdown: '![Board \\[top\\] side](/api/uploads/3/page.webp)' },
  {
    name: 'photos between paragraphs',
    markdown: 'The relay clicks\n\n![Relay board](/api/uploads/3/page.webp "Before the fix")\n\nthen resets.',
  },
  { name: 'an attachment link', markdown: 'Files: [schematic.pdf](/api/uploads/13/original.pdf)' },
  {
    name: 'attachment names with underscores and brackets',
    markdown: '[kiln_logger-rev_a.zip](/api/uploads/14/original.zip) and [bom \\[v2\\].csv](/api/uploads/15/original.csv)',
  },
];

describe('uploads in Markdown', () => {
  it.each(canonical)('gives back $name unchanged', ({ markdown }) => {
    expect(roundTrip(markdown)).toBe(markdown);
    expect(roundTrip(roundTrip(markdown))).toBe(markdown);
  });

  it.each(canonical)('writes $name so that our renderer shows the same page', ({ markdown }) => {
    expect(renderMarkdown(roundTrip(markdown)).html).toBe(renderMarkdown(markdown).html);
  });

  it('what the upload code puts in the editor reads back the same', () => {
    const editor = load('Before\n\nAfter', true);
    addPlaceholders(editor, [{ key: 'k', kind: 'image', name: 'a.jpg', previewUrl: 'blob:a' }], 8);
    replacePlaceholder(editor, 'k', { type: 'image', attrs: { src: '/api/uploads/12/page.webp', alt: '' } });
    describeImages(editor, '/api/uploads/12/page.webp', { alt: 'U3 [regulator] "hot" side', title: 'At 400 mA "peak"' });
    const written = editor.getMarkdown();
    expect(written).toBe('Before\n\n![U3 \\[regulator\\] "hot" side](/api/uploads/12/page.webp "At 400 mA \\"peak\\"")\n\nAfter');
    expect(roundTrip(written)).toBe(written);
    const image = load(written).getJSON().content![1]!;
    expect(image.attrs).toMatchObject({ alt: 'U3 [regulator] "hot" side', title: 'At 400 mA "peak"' });
  });
});
