import { Parser } from 'htmlparser2';
import { describe, expect, it } from 'vitest';
import { AppError } from '../../../api/http/errors';
import { MAX_MARKDOWN_CHARS, plainTextOf, renderMarkdown } from '../../../api/markdown/render';

function html(markdown: string): string {
  return renderMarkdown(markdown).html;
}

/** Deepest element nesting in a fragment, by parsing it rather than counting strings. */
function maxDepth(fragment: string): number {
  let depth = 0;
  let max = 0;
  const parser = new Parser({
    onopentag() {
      depth++;
      max = Math.max(max, depth);
    },
    onclosetag() {
      depth--;
    },
  });
  parser.write(fragment);
  parser.end();
  return max;
}

describe('headings', () => {
  it('get prefixed ids from their text and a table of contents', () => {
    const { html: out, toc } = renderMarkdown('# Power supply\n\nText.\n\n## Wiring & *fuses*\n');
    expect(out).toContain('<h1 id="h-power-supply">Power supply</h1>');
    expect(out).toContain('<h2 id="h-wiring-fuses">Wiring &amp; <em>fuses</em></h2>');
    expect(toc).toEqual([
      { level: 1, id: 'h-power-supply', text: 'Power supply' },
      { level: 2, id: 'h-wiring-fuses', text: 'Wiring & fuses' },
    ]);
  });

  it('make repeated ids unique with -2, -3 and never reuse an id a heading spelled out', () => {
    const { toc } = renderMarkdown('# Notes\n# Notes\n# Notes-2\n# Notes\n');
    expect(toc.map((entry) => entry.id)).toEqual(['h-notes', 'h-notes-2', 'h-notes-2-2', 'h-notes-3']);
  });

  it('use the prefix the caller asks for', () => {
    const { html: out, toc } = renderMarkdown('## Bill of materials', { idPrefix: 'rev3-' });
    expect(out).toContain('<h2 id="rev3-bill-of-materials">');
    expect(toc[0]?.id).toBe('rev3-bill-of-materials');
  });

  it('refuse a prefix that could break out of an id', () => {
    expect(() => renderMarkdown('# x', { idPrefix: '"><b' })).toThrow(TypeError);
    expect(() => renderMarkdown('# x', { idPrefix: '' })).toThrow(TypeError);
  });

  it('list only h1 to h4 in the table of contents but give every level an id', () => {
    const { html: out, toc } = renderMarkdown('# a\n## b\n### c\n#### d\n##### e\n###### f\n');
    expect(toc.map((entry) => entry.level)).toEqual([1, 2, 3, 4]);
    expect(out).toContain('<h5 id="h-e">');
    expect(out).toContain('<h6 id="h-f">');
  });

  it('keep letters of any script and fall back to "section" when nothing is left', () => {
    const { toc } = renderMarkdown('# Überblick\n# 配線と電源\n# ***\n#\n');
    expect(toc.map((entry) => entry.id)).toEqual(['h-uberblick', 'h-配線と電源', 'h-section', 'h-section-2']);
  });

  it('do not carry ids from one document into the next', () => {
    renderMarkdown('# Intro');
    expect(renderMarkdown('# Intro').toc[0]?.id).toBe('h-intro');
  });
});

describe('tables', () => {
  it('render with alignment as classes and no style attribute', () => {
    const out = html('| Part | Qty | Price |\n|:-----|:---:|------:|\n| M3 screw | 12 | 0.40 |\n');
    expect(out).toContain('<th class="align-left">Part</th>');
    expect(out).toContain('<th class="align-center">Qty</th>');
    expect(out).toContain('<td class="align-right">0.40</td>');
    expect(out).not.toContain('style=');
  });
});

describe('task lists', () => {
  it('render unchecked and checked items as disabled checkboxes', () => {
    const out = html('- [ ] order standoffs\n- [x] flash firmware\n- [X] label cables\n');
    expect(out).toContain(
      '<li class="task-item" data-checked="false"><input type="checkbox" disabled /> order standoffs</li>',
    );
    expect(out).toContain(
      '<li class="task-item" data-checked="true"><input type="checkbox" disabled checked /> flash firmware</li>',
    );
    expect(out).toContain(
      '<li class="task-item" data-checked="true"><input type="checkbox" disabled checked /> label cables</li>',
    );
  });

  it('parse the rest of the item as Markdown', () => {
    expect(html('- [ ] check **polarity** of [C4](/builds/psu#c4)')).toContain(
      '<input type="checkbox" disabled /> check <strong>polarity</strong> of <a href="/builds/psu#c4" rel="nofollow ugc noopener">C4</a>',
    );
  });

  it('work in loose and ordered lists and leave other items alone', () => {
    const out = html('1. [x] first\n\n2. second\n');
    expect(out).toContain(
      '<li class="task-item" data-checked="true">\n<p><input type="checkbox" disabled checked /> first</p>',
    );
    expect(out).toContain('<li>\n<p>second</p>');
  });

  it('need the marker at the start of a list item', () => {
    expect(html('[ ] not in a list')).toBe('<p>[ ] not in a list</p>\n');
    expect(html('- text [x] later')).toBe('<ul>\n<li>text [x] later</li>\n</ul>\n');
    expect(html('- [y] other letter')).not.toContain('checkbox');
    expect(html('- [x]no space')).not.toContain('checkbox');
  });

  it('keep an empty item, as the editor writes it, as a task', () => {
    expect(html('- [ ]\n- [x] done')).toContain(
      '<li class="task-item" data-checked="false"><input type="checkbox" disabled /> </li>',
    );
  });
});

describe('code', () => {
  it('keeps a safe fence language as a class', () => {
    expect(html('```c++\nint x;\n```')).toBe('<pre><code class="language-c++">int x;\n</code></pre>\n');
    expect(html('~~~ python title="x.py"\npass\n~~~')).toBe('<pre><code class="language-python">pass\n</code></pre>\n');
  });

  it('drops a language that is not a plain token', () => {
    expect(html('```{r}\nx\n```')).toBe('<pre><code>x\n</code></pre>\n');
    expect(html('```' + 'a'.repeat(33) + '\nx\n```')).toBe('<pre><code>x\n</code></pre>\n');
  });

  it('escapes code content', () => {
    expect(html('`<b>&`')).toBe('<p><code>&lt;b&gt;&amp;</code></p>\n');
  });
});

describe('links and images', () => {
  it.each([
    ['https://example.com/datasheet.pdf'],
    ['http://example.com/'],
    ['mailto:builder@example.com'],
    ['/builds/desk-lamp'],
    ['#h-wiring'],
    ['notes/wiring.md'],
    ['?rev=3'],
  ])('keeps an allowed link to %s and gives it the ugc rel', (url) => {
    expect(html(`[go](${url})`)).toBe(`<p><a href="${url}" rel="nofollow ugc noopener">go</a></p>\n`);
  });

  it('keeps the title and sets no target', () => {
    const out = html('[spec](https://example.com "Rev 2")');
    expect(out).toBe('<p><a href="https://example.com" title="Rev 2" rel="nofollow ugc noopener">spec</a></p>\n');
  });

  it('links autolinks and email autolinks, but not bare URLs', () => {
    expect(html('<https://example.com/a>')).toContain('<a href="https://example.com/a" rel="nofollow ugc noopener">');
    expect(html('<parts@example.com>')).toContain(
      '<a href="mailto:parts@example.com" rel="nofollow ugc noopener">parts@example.com</a>',
    );
    expect(html('see https://example.com/a')).toBe('<p>see https://example.com/a</p>\n');
  });

  it.each([
    ['javascript:alert(1)'],
    ['data:text/html,x'],
    ['ftp://example.com/'],
    ['//example.com/'],
    ['/\\example.com/'],
    ['tel:+100'],
  ])('leaves a link to %s as plain text', (url) => {
    const out = html(`[go](${url})`);
    expect(out).not.toContain('<a');
    expect(out).toMatch(/^<p>\[go\]\(/);
  });

  it('keeps http(s) and app-path images', () => {
    expect(html('![board](https://example.com/b.jpg "top")')).toBe(
      '<p><img src="https://example.com/b.jpg" alt="board" title="top" /></p>\n',
    );
    expect(html('![board](/uploads/3/b.jpg)')).toBe('<p><img src="/uploads/3/b.jpg" alt="board" /></p>\n');
  });

  it('shows the alt text instead of an image with a relative, mailto or protocol-relative source', () => {
    expect(html('![the *board*](b.jpg)')).toBe('<p>the <em>board</em></p>\n');
    expect(html('![x](mailto:a@example.com)')).toBe('<p>x</p>\n');
    expect(html('![x](//example.com/b.jpg)')).toBe('<p>![x](//example.com/b.jpg)</p>\n');
  });
});

describe('other syntax', () => {
  it('renders strikethrough and leaves quotes and dashes as typed', () => {
    expect(html('~~old~~ "new" -- (c)')).toBe('<p><s>old</s> "new" -- (c)</p>\n');
  });

  it('shows raw HTML as text', () => {
    expect(html('<b onclick="x()">hi</b>')).toBe('<p>&lt;b onclick="x()"&gt;hi&lt;/b&gt;</p>\n');
  });
});

describe('size limit', () => {
  it('renders a document of exactly the limit', () => {
    expect(renderMarkdown('a'.repeat(MAX_MARKDOWN_CHARS)).html.length).toBeGreaterThan(MAX_MARKDOWN_CHARS);
  });

  it('refuses a longer document with payload_too_large', () => {
    const tooLong = 'a'.repeat(MAX_MARKDOWN_CHARS + 1);
    for (const attempt of [() => renderMarkdown(tooLong), () => plainTextOf(tooLong)]) {
      let caught: unknown;
      try {
        attempt();
      } catch (error) {
        caught = error;
      }
      expect(caught).toBeInstanceOf(AppError);
      expect(caught).toMatchObject({ code: 'payload_too_large', status: 413, details: { limit: MAX_MARKDOWN_CHARS } });
    }
  });
});

describe('pathological input', () => {
  // Measured at well under 1 s each on the 2-core CI machine; the budget is there to catch
  // quadratic behaviour (40,000 equal headings once took a minute), not to benchmark.
  const BUDGET_MS = 3000;

  function timed(markdown: string): { out: string; ms: number } {
    const start = performance.now();
    const out = renderMarkdown(markdown).html;
    return { out, ms: performance.now() - start };
  }

  it.each([
    ['10,000 nested quotes', '>'.repeat(10_000) + ' deep'],
    ['10,000 spaced nested quotes', '> '.repeat(10_000) + 'deep'],
    ['10,000 nested bullets', '- '.repeat(10_000) + 'deep'],
    ['10,000 nested ordered items', '1. '.repeat(10_000) + 'deep'],
    ['400 indented list levels', Array.from({ length: 400 }, (_, i) => ' '.repeat(i * 2) + '- x').join('\n')],
    ['10,000 nested emphasis and links', '*['.repeat(10_000) + 'x' + '](/a)*'.repeat(10_000)],
  ])('%s stays shallow and small', (_name, markdown) => {
    const { out, ms } = timed(markdown);
    expect(ms).toBeLessThan(BUDGET_MS);
    // markdown-it stops nesting at maxNesting (20): deeper content is dropped or left as text.
    expect(maxDepth(out)).toBeLessThanOrEqual(25);
  });

  it.each([
    ['50,000 asterisks', '*'.repeat(50_000)],
    ['50,000 "*a " runs', '*a '.repeat(50_000)],
    ['50,000 underscores', '_'.repeat(50_000)],
    ['60,000 "**_" runs', '**_'.repeat(60_000)],
    ['50,000 open brackets', '['.repeat(50_000)],
    ['25,000 brackets, then closers', '['.repeat(25_000) + ']'.repeat(25_000)],
    ['40,000 unclosed link destinations', '[a]('.repeat(40_000)],
    ['50,000 unclosed images', '!['.repeat(50_000)],
    ['50,000 backticks', '`'.repeat(50_000)],
    ['backtick runs of every length to 600', Array.from({ length: 600 }, (_, i) => '`'.repeat(i + 1) + 'a').join(' ')],
    ['50,000 less-than signs', '<'.repeat(50_000)],
    ['50,000 "&#" pairs', '&#'.repeat(50_000)],
    ['50,000 tildes', '~'.repeat(50_000)],
    ['40,000 equal headings', '# h\n'.repeat(40_000)],
    ['a 20,000-column table', '|a'.repeat(20_000) + '\n' + '|-'.repeat(20_000) + '\n' + '|b'.repeat(20_000)],
  ])('%s renders quickly to bounded output', (_name, markdown) => {
    const { out, ms } = timed(markdown);
    expect(ms).toBeLessThan(BUDGET_MS);
    // Escaping can quadruple a character (`<` → `&lt;`) and markup adds a little per block.
    expect(out.length).toBeLessThanOrEqual(markdown.length * 8 + 1024);
  });
});

describe('plainTextOf', () => {
  it('keeps the words and code, one block per line, without markup or URLs', () => {
    const text = plainTextOf(
      '# Fan *controller*\n\nUses a [4-pin header](https://example.com/x) &amp; `PWM`.\n\n- [x] solder\n- wire ![fan](/f.jpg)\n\n```\nduty = 40\n```\n',
    );
    expect(text).toBe('Fan controller\nUses a 4-pin header & PWM.\nsolder\nwire fan\nduty = 40');
  });

  it('treats raw HTML as the text it is shown as', () => {
    expect(plainTextOf('<b>bold</b>')).toBe('<b>bold</b>');
  });
});
