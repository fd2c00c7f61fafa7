// @vitest-environment happy-dom
/**
 * Markdown is the stored form of every write-up, so the editor must give back what it was given.
 * Each document below is written in the editor's canonical style (the one `getMarkdown()` writes)
 * and must come back byte for byte, and stay so on a second pass. Where other spellings of the
 * same document are normalised, the expected canonical text is spelled out by hand.
 */
import { Editor } from '@tiptap/core';
import { afterEach, describe, expect, it } from 'vitest';
import { renderMarkdown } from '../../../api/markdown/render';
import { demoWriteUps } from '../../../db/demo/write-ups';
import { editorExtensions } from '@/components/editor/markdown-extensions';

const editors: Editor[] = [];

function load(markdown: string): Editor {
  const editor = new Editor({ extensions: editorExtensions(), content: markdown, contentType: 'markdown' });
  editors.push(editor);
  return editor;
}

function roundTrip(markdown: string): string {
  return load(markdown).getMarkdown();
}

afterEach(() => {
  while (editors.length) editors.pop()!.destroy();
});

const buildWriteUp = [
  '## Overview',
  '',
  'The *Tidewatch* logger samples a pressure sensor every 10 s and keeps a week of readings on a',
  'SPI flash. It runs from two AA cells; the **whole board idles at 18 µA**.',
  '',
  '### Hardware',
  '',
  '- MCU: a Cortex-M0+ with 64 kB flash',
  '  - clocked at 8 MHz from the internal oscillator',
  '  - `PA4` drives the sensor enable',
  '- Sensor on I2C at address `0x76`',
  '- Supply: 2 × AA → buck-boost → 3.3 V',
  '',
  '| Ref | Part | Note |',
  '|---|---|---|',
  '| U1 | MCU | QFN-32 |',
  '| U2 | Buck-boost | needs 10 µH, not 4.7 µH |',
  '| J1 | SWD header | |',
  '',
  '![Rev B board with the bodge wire from U3 pin 4 to R12](https://example.org/tidewatch/rev-b.jpg)',
  '',
  '### Firmware',
  '',
  '1. Wake on the RTC alarm',
  '2. Power the sensor, wait 5 ms, read it',
  '3. Append to the ring buffer in flash',
  '   1. erase a 4 kB sector when crossing into it',
  '   2. write the 8-byte record',
  '',
  '```c',
  'static void sample(void) {',
  '  sensor_power(true);',
  '  delay_ms(5);',
  '  ring_append(read_pressure());',
  '}',
  '```',
  '',
  '> The first build reset whenever the flash erased a sector: the buck-boost could not',
  '> supply the 15 mA peak. See erratum E2.',
  '',
  '### Postmortem',
  '',
  '- [x] Swap the 4.7 µH inductor for 10 µH',
  '- [x] Move the pull-ups to the switched rail',
  '- [ ] Add a test point on VBAT',
  '',
  'Sleep current went from 210 µA to 18 µA, and the battery estimate from 3 weeks to',
  'about 11 months. Details in [the power notes](/projects/tidewatch) and the',
  '[datasheet](https://example.org/parts/buck-boost.pdf "Buck-boost datasheet").',
  '',
  '---',
  '',
  'Questions: [mail the maker](mailto:maker@example.org)\\',
  'Replies within a week.',
].join('\n');

const canonical: { name: string; markdown: string }[] = [
  { name: 'headings H2 to H4', markdown: '## Hardware\n\n### Power\n\n#### Regulator' },
  { name: 'a stored H1 and H5 (not offered by the toolbar, kept)', markdown: '# Title\n\n##### Small print' },
  {
    name: 'bold, italic, strike and inline code',
    markdown: 'Some **bold**, *italic*, ~~struck~~ and `inline code` text.',
  },
  { name: 'nested emphasis', markdown: '***Both*** and **bold with *italic* inside**.' },
  { name: 'nested bullet lists', markdown: '- Power\n  - LDO\n    - 3.3 V\n- Signals' },
  { name: 'nested ordered lists', markdown: '1. Solder U1\n2. Flash it\n   1. Erase\n   2. Write\n3. Test' },
  { name: 'a bullet list inside an ordered list', markdown: '1. Check rails\n   - 3.3 V\n   - 5 V\n2. Boot' },
  { name: 'an ordered list inside a bullet list', markdown: '- Bring-up\n  1. Power\n  2. Clock' },
  { name: 'a loose list with two paragraphs in an item', markdown: '- First item\n\n  More about it\n- Second' },
  { name: 'task lists, checked, unchecked and nested', markdown: '- [ ] Order parts\n- [x] Etch board\n  - [ ] Drill' },
  { name: 'block quotes with two paragraphs', markdown: '> Quoted\n> text\n>\n> Second paragraph' },
  { name: 'a list inside a block quote', markdown: '> Watch out:\n>\n> - heat\n> - polarity' },
  { name: 'fenced code with a language', markdown: '```c\nint main(void) {\n  return 0;\n}\n```' },
  { name: 'fenced code without a language, with a blank line', markdown: '```\nfirst\n\nsecond\n```' },
  { name: 'a code sample that contains a fence', markdown: '````md\n```c\nx = 1;\n```\n````' },
  {
    name: 'links: web, e-mail, app path and with a title',
    markdown:
      '[site](https://example.org/a) [mail](mailto:a@example.org) [project](/projects/tidewatch) [doc](https://example.org "The doc")',
  },
  { name: 'a link with bold text', markdown: '[**Read this**](https://example.org)' },
  {
    name: 'a table with a header row',
    markdown: '| Pin | Signal | Note |\n|---|---|---|\n| 1 | VCC | 3.3 V only |\n| 2 | GND | |',
  },
  {
    name: 'table column alignment',
    markdown: '| Left | Middle | Right |\n|:---|:---:|---:|\n| a | b | c |',
  },
  {
    name: 'pipes in table cells, in text and in code',
    markdown: '| Expr | Meaning |\n|---|---|\n| `a \\| b` | a or b |\n| x \\| y | either |',
  },
  { name: 'images with alt text', markdown: '![The Rev A board, top side](https://example.org/rev-a.jpg)' },
  { name: 'an image with a title', markdown: '![Scope trace](https://example.org/scope.png "Ripple at 400 mA")' },
  { name: 'horizontal rules', markdown: 'Above\n\n---\n\nBelow' },
  { name: 'hard breaks', markdown: 'Line one\\\nline two' },
  { name: 'soft line breaks inside a paragraph', markdown: 'One sentence per line.\nAnother sentence.' },
  { name: 'comparison signs and ampersands as typed', markdown: 'VCC > 3.3 V & I < 500 mA -> fine, 2 <= 3' },
  { name: 'underscores inside identifiers', markdown: 'Set GPIO_NUM_35 in sdkconfig_defaults.' },
  {
    name: 'escaped Markdown characters',
    markdown: '2 \\* 3, \\_not emphasis\\_, \\[not a link\\], \\~5 V and a \\`tick',
  },
  { name: 'a paragraph that only looks like a heading', markdown: '\\# of pins: 32' },
  { name: 'a paragraph that only looks like a list', markdown: '2026\\. was the year of Rev C' },
  { name: 'a paragraph that only looks like a quote', markdown: '\\> not quoted' },
  { name: 'raw HTML, kept as the text it is', markdown: 'V\\<sub>CC\\</sub> and \\<br> stay text' },
  { name: 'an invented build write-up', markdown: buildWriteUp },
];

describe('Markdown round trip', () => {
  it.each(canonical)('gives back $name unchanged', ({ markdown }) => {
    const once = roundTrip(markdown);
    expect(once).toBe(markdown);
    expect(roundTrip(once)).toBe(markdown);
  });

  it.each(canonical)('writes $name so that our renderer shows the same page', ({ markdown }) => {
    expect(renderMarkdown(roundTrip(markdown)).html).toBe(renderMarkdown(markdown).html);
  });

  it('keeps every word of the write-up in the editor document', () => {
    const text = load(buildWriteUp).getText();
    for (const phrase of ['whole board idles at 18 µA', 'needs 10 µH, not 4.7 µH', 'ring_append', 'erratum E2']) {
      expect(text).toContain(phrase);
    }
  });
});

describe('the demo write-ups', () => {
  // Written by hand for the seed (db/demo), not in the editor: what real documents look like.
  const revisions = demoWriteUps.flatMap((project) =>
    [...project.sections, ...project.logEntries].flatMap((doc) =>
      doc.revisions.map((revision, index) => ({
        name: `${project.slug}: ${revision.title} (revision ${index + 1})`,
        body: revision.body,
      })),
    ),
  );

  it('are there to test', () => {
    expect(revisions.length).toBeGreaterThan(10);
  });

  it.each(revisions)('$name comes back unchanged', ({ body }) => {
    expect(roundTrip(body)).toBe(body);
  });
});

/**
 * Other spellings of the same document are written in the canonical style. Each pair was worked
 * out by hand from CommonMark: both sides mean the same document.
 */
const normalised: { name: string; input: string; canonical: string }[] = [
  { name: 'underscore emphasis becomes asterisks', input: '_a_ and __b__', canonical: '*a* and **b**' },
  { name: 'star bullets become dashes', input: '* one\n* two', canonical: '- one\n- two' },
  { name: 'plus bullets become dashes', input: '+ one\n+ two', canonical: '- one\n- two' },
  { name: 'other thematic breaks become ---', input: 'a\n\n***\n\nb\n\n___', canonical: 'a\n\n---\n\nb\n\n---' },
  { name: 'two-space hard breaks become a backslash', input: 'one  \ntwo', canonical: 'one\\\ntwo' },
  {
    name: 'padded table columns lose their padding (one edit must not rewrite every row)',
    input: '| Pin | Use       |\n| --- | --------- |\n| 1   | VCC       |\n| 2   | long name |',
    canonical: '| Pin | Use |\n|---|---|\n| 1 | VCC |\n| 2 | long name |',
  },
  { name: 'the final line break is dropped', input: 'Last line\n', canonical: 'Last line' },
  {
    name: 'HTML entities for < > & become the characters',
    input: '3 &lt; 5 &amp;&amp; 5 &gt; 3',
    canonical: '3 < 5 && 5 > 3',
  },
  {
    name: 'raw HTML gets the backslash that keeps it text',
    input: 'a <b>bold</b> tag',
    canonical: 'a \\<b>bold\\</b> tag',
  },
  { name: 'an HTML block becomes a paragraph of text', input: '<div>\nhi\n</div>', canonical: '\\<div>\nhi\n\\</div>' },
  {
    name: 'bullets under an ordered item are indented to its text',
    input: '1. first\n  - nested\n2. second',
    canonical: '1. first\n   - nested\n2. second',
  },
];

describe('Markdown normalisation', () => {
  it.each(normalised)('$name', ({ input, canonical: expected }) => {
    expect(roundTrip(input)).toBe(expected);
    expect(roundTrip(expected)).toBe(expected);
  });
});

describe('what the editor writes reads the same in our renderer', () => {
  // The server renders with markdown-it (api/markdown/render.ts); these outputs must mean there
  // what they meant in the editor.
  it('escaped look-alikes stay paragraphs of plain text', () => {
    const { html } = renderMarkdown(roundTrip('\\# of pins\n\n\\> not quoted\n\n2026\\. a year'));
    expect(html).toBe('<p># of pins</p>\n<p>&gt; not quoted</p>\n<p>2026. a year</p>\n');
  });

  it('a bullet list under an ordered item is nested in it', () => {
    const { html } = renderMarkdown(roundTrip('1. first\n   - nested\n2. second'));
    expect(html.replace(/\n/g, '')).toBe('<ol><li>first<ul><li>nested</li></ul></li><li>second</li></ol>');
  });

  it('pipes in table cells stay inside their cell', () => {
    const { html } = renderMarkdown(canonical.find((c) => c.name.startsWith('pipes'))!.markdown);
    expect(html).toContain('<td><code>a | b</code></td>');
    expect(html).toContain('<td>x | y</td>');
  });

  it('raw HTML is shown as its characters, as in the editor', () => {
    const editor = load('V<sub>CC</sub>');
    expect(editor.getText()).toBe('V<sub>CC</sub>');
    expect(renderMarkdown(editor.getMarkdown()).html).toBe('<p>V&lt;sub&gt;CC&lt;/sub&gt;</p>\n');
  });

  it('a hard break is a line break', () => {
    expect(renderMarkdown(roundTrip('one\\\ntwo')).html).toBe('<p>one<br />\ntwo</p>\n');
  });
});

describe('toolbar commands write the expected Markdown', () => {
  /** Selects the first occurrence of `word` in the document. */
  function select(editor: Editor, word: string) {
    let found: { from: number; to: number } | null = null;
    editor.state.doc.descendants((node, pos) => {
      if (found || !node.isText) return;
      const at = node.text!.indexOf(word);
      if (at >= 0) found = { from: pos + at, to: pos + at + word.length };
    });
    if (!found) throw new Error(`"${word}" is not in the document`);
    editor.commands.setTextSelection(found);
  }

  it('bold, italic, strike and code on a selected word', () => {
    const editor = load('Check the fuse first.');
    select(editor, 'fuse');
    editor.chain().toggleBold().run();
    expect(editor.getMarkdown()).toBe('Check the **fuse** first.');
    select(editor, 'Check');
    editor.chain().toggleItalic().run();
    select(editor, 'first');
    editor.chain().toggleStrike().run();
    expect(editor.getMarkdown()).toBe('*Check* the **fuse** ~~first~~.');
    select(editor, 'the');
    editor.chain().toggleCode().run();
    expect(editor.getMarkdown()).toBe('*Check* `the` **fuse** ~~first~~.');
  });

  it('headings of level 2 to 4, and none of level 1', () => {
    const editor = load('Power');
    expect(editor.commands.toggleHeading({ level: 3 })).toBe(true);
    expect(editor.getMarkdown()).toBe('### Power');
    expect(editor.can().toggleHeading({ level: 1 })).toBe(false);
  });

  it('inserting a table gives a 3 × 3 GFM table with a header row', () => {
    const editor = load('');
    editor.commands.insertTable({ rows: 3, cols: 3, withHeaderRow: true });
    expect(editor.getMarkdown()).toBe(['| | | |', '|---|---|---|', '| | | |', '| | | |'].join('\n'));
    editor.commands.insertContent('Pin');
    editor.commands.addColumnAfter();
    editor.commands.addRowAfter();
    expect(editor.getMarkdown().split('\n')).toHaveLength(5);
    expect(editor.getMarkdown().split('\n')[0]).toBe('| Pin | | | |');
    editor.commands.deleteTable();
    expect(editor.getMarkdown()).toBe('');
  });

  it('lists, task lists, quotes, code blocks with a language and a divider', () => {
    const editor = load('Buy parts');
    editor.commands.toggleTaskList();
    expect(editor.getMarkdown()).toBe('- [ ] Buy parts');
    editor.commands.toggleTaskList();
    editor.commands.toggleOrderedList();
    expect(editor.getMarkdown()).toBe('1. Buy parts');
    editor.commands.toggleOrderedList();
    editor.commands.toggleBlockquote();
    expect(editor.getMarkdown()).toBe('> Buy parts');
    editor.commands.toggleBlockquote();
    editor.commands.toggleCodeBlock();
    editor.commands.updateAttributes('codeBlock', { language: 'python' });
    expect(editor.getMarkdown()).toBe('```python\nBuy parts\n```');
    editor.commands.toggleCodeBlock();
    editor.commands.setTextSelection(editor.state.doc.content.size - 1);
    editor.commands.setHorizontalRule();
    expect(editor.getMarkdown()).toBe('Buy parts\n\n---');
  });

  it('links and images', () => {
    const editor = load('See the notes.');
    select(editor, 'notes');
    editor.commands.setLink({ href: 'https://example.org/notes' });
    expect(editor.getMarkdown()).toBe('See the [notes](https://example.org/notes).');
    editor.commands.setTextSelection(editor.state.doc.content.size - 1);
    editor.commands.setImage({ src: 'https://example.org/a.jpg', alt: 'Board [top] side' });
    expect(editor.getMarkdown()).toBe(
      'See the [notes](https://example.org/notes).\n\n![Board \\[top\\] side](https://example.org/a.jpg)',
    );
  });

  it('refuses script links even when asked directly', () => {
    const editor = load('Click');
    select(editor, 'Click');
    expect(editor.commands.setLink({ href: 'javascript:alert(1)' })).toBe(false);
    expect(editor.getMarkdown()).toBe('Click');
  });

  it('a typed > or < stays as typed', () => {
    const editor = load('');
    // As typed text, not as HTML to parse (which `insertContent` does with a plain string).
    editor.commands.insertContent({ type: 'text', text: 'I > 400 mA heats U2 & <b> is not a tag' });
    expect(editor.getMarkdown()).toBe('I > 400 mA heats U2 & \\<b> is not a tag');
  });
});
