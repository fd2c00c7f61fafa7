/**
 * Hostile Markdown through the renderer, checked by parsing the output with htmlparser2 (never
 * with regular expressions). Payloads: OWASP "XSS Filter Evasion Cheat Sheet"
 * (cheatsheetseries.owasp.org), markdown-it's XSS fixtures (markdown-it repository,
 * test/fixtures/markdown-it/xss.txt) and vectors written for this suite; each payload names its
 * source in tests/fixtures/hostile-markdown.ts and in its test name.
 */
import { Parser } from 'htmlparser2';
import markdownIt from 'markdown-it';
import { describe, expect, it } from 'vitest';
import { renderMarkdown, sanitizeRendered } from '../../../api/markdown/render';
import { hostileMarkdown } from '../../fixtures/hostile-markdown';

interface Parsed {
  elements: { name: string; attribs: Record<string, string> }[];
  text: string;
  others: string[];
}

function parse(html: string): Parsed {
  const parsed: Parsed = { elements: [], text: '', others: [] };
  const parser = new Parser(
    {
      onopentag(name, attribs) {
        parsed.elements.push({ name, attribs });
      },
      ontext(text) {
        parsed.text += text;
      },
      oncomment(comment) {
        parsed.others.push(`comment ${JSON.stringify(comment)}`);
      },
      onprocessinginstruction(name) {
        parsed.others.push(`processing instruction or declaration ${JSON.stringify(name)}`);
      },
      oncdatastart() {
        parsed.others.push('CDATA section');
      },
    },
    { decodeEntities: true, lowerCaseTags: true, lowerCaseAttributeNames: true },
  );
  parser.write(html);
  parser.end();
  return parsed;
}

const FORBIDDEN = ['script', 'iframe', 'object', 'embed', 'svg', 'math', 'style', 'form', 'meta', 'base', 'link'];

const ALLOWED: Record<string, readonly string[]> = {
  p: [],
  strong: [],
  em: [],
  s: [],
  pre: [],
  blockquote: [],
  ul: [],
  hr: [],
  br: [],
  table: [],
  thead: [],
  tbody: [],
  tr: [],
  h1: ['id'],
  h2: ['id'],
  h3: ['id'],
  h4: ['id'],
  h5: ['id'],
  h6: ['id'],
  a: ['href', 'title', 'rel'],
  img: ['src', 'alt', 'title', 'width', 'height'],
  code: ['class'],
  ol: ['start'],
  li: ['class', 'data-checked'],
  input: ['type', 'checked', 'disabled'],
  th: ['class'],
  td: ['class'],
};

const CLASSES: Record<string, RegExp> = {
  code: /^language-[A-Za-z0-9_+#.-]{1,32}$/,
  li: /^task-item$/,
  th: /^align-(?:left|center|right)$/,
  td: /^align-(?:left|center|right)$/,
};

const BASE = 'https://app.invalid/';

/**
 * What is wrong with one URL attribute, if anything. Always: it resolves to http, https or
 * mailto (images: http or https) and is not a network path. `strict` adds the renderer's own
 * image rule (absolute http(s) or an app path), which the sanitizer alone does not enforce.
 */
function urlProblem(tag: string, attr: string, value: string, strict: boolean): string | undefined {
  let resolved: URL;
  try {
    resolved = new URL(value, BASE);
  } catch {
    return `${tag}[${attr}] does not parse: ${JSON.stringify(value)}`;
  }
  const allowed = tag === 'img' ? ['http:', 'https:'] : ['http:', 'https:', 'mailto:'];
  if (!allowed.includes(resolved.protocol))
    return `${tag}[${attr}] has scheme ${resolved.protocol} (${JSON.stringify(value)})`;
  if (/^[\s/\\]*[/\\]{2}/.test(value)) return `${tag}[${attr}] is a network path: ${JSON.stringify(value)}`;
  if (
    strict &&
    tag === 'img' &&
    !/^https?:/i.test(value) &&
    !(value.startsWith('/') && resolved.origin === new URL(BASE).origin)
  ) {
    return `img[src] is neither absolute http(s) nor an app path: ${JSON.stringify(value)}`;
  }
  return undefined;
}

/** Every way the HTML breaks the output contract, as readable strings (empty when safe). */
function violations(html: string, strict: boolean): string[] {
  const parsed = parse(html);
  const found: string[] = [...parsed.others];
  for (const { name, attribs } of parsed.elements) {
    if (FORBIDDEN.includes(name)) found.push(`forbidden element <${name}>`);
    const allowedAttributes = ALLOWED[name];
    if (!allowedAttributes) {
      found.push(`element <${name}> is not on the allow-list`);
      continue;
    }
    for (const [attr, value] of Object.entries(attribs)) {
      if (attr.startsWith('on')) found.push(`event handler ${attr} on <${name}>`);
      if (attr === 'style') found.push(`style attribute on <${name}>`);
      if (!allowedAttributes.includes(attr)) found.push(`attribute ${attr} on <${name}> is not on the allow-list`);
      if (attr === 'href' || attr === 'src') {
        const problem = urlProblem(name, attr, value, strict);
        if (problem) found.push(problem);
      }
      if (attr === 'class') {
        for (const className of value.split(/\s+/)) {
          if (!CLASSES[name]?.test(className)) found.push(`class ${JSON.stringify(className)} on <${name}>`);
        }
      }
      if (attr === 'id' && !/^h-[\p{L}\p{N}_-]+$/u.test(value))
        found.push(`id ${JSON.stringify(value)} lacks the prefix`);
    }
    if (name === 'input' && (attribs.type !== 'checkbox' || !('disabled' in attribs))) {
      found.push(`input that is not a disabled checkbox: ${JSON.stringify(attribs)}`);
    }
    if (name === 'a' && attribs.rel !== 'nofollow ugc noopener')
      found.push(`link rel is ${JSON.stringify(attribs.rel)}`);
  }
  return found;
}

describe('the fixture', () => {
  it('has at least 40 uniquely named payloads, each with a source', () => {
    expect(hostileMarkdown.length).toBeGreaterThanOrEqual(40);
    expect(new Set(hostileMarkdown.map((p) => p.name)).size).toBe(hostileMarkdown.length);
    for (const payload of hostileMarkdown) {
      expect(payload.source, payload.name).toMatch(
        /^(OWASP XSS Filter Evasion Cheat Sheet|markdown-it repository|written for this suite)/,
      );
    }
  });

  it('draws on both published sources', () => {
    const owasp = hostileMarkdown.filter((p) => p.source.startsWith('OWASP')).length;
    const markdownItFixtures = hostileMarkdown.filter((p) => p.source.startsWith('markdown-it')).length;
    expect(owasp).toBeGreaterThanOrEqual(20);
    expect(markdownItFixtures).toBeGreaterThanOrEqual(10);
  });
});

describe('the checker', () => {
  // The per-payload tests are only as good as `violations`; prove it catches what it claims to.
  it.each([
    ['<script>alert(1)</script>', 'forbidden element <script>'],
    ['<p onclick="x()">a</p>', 'event handler onclick on <p>'],
    ['<p style="color:red">a</p>', 'style attribute on <p>'],
    ['<div>a</div>', 'element <div> is not on the allow-list'],
    ['<a href="javascript:alert(1)" rel="nofollow ugc noopener">a</a>', 'a[href] has scheme javascript:'],
    ['<a href="  //evil.invalid/" rel="nofollow ugc noopener">a</a>', 'a[href] is a network path'],
    ['<img src="mailto:a@b.invalid">', 'img[src] has scheme mailto:'],
    ['<img src="b.jpg">', 'img[src] is neither absolute http(s) nor an app path'],
    ['<input type="text">', 'input that is not a disabled checkbox'],
    ['<h1 id="app">a</h1>', 'id "app" lacks the prefix'],
    ['<code class="language-js evil">a</code>', 'class "evil" on <code>'],
    ['<a href="/x">a</a>', 'link rel is undefined'],
    ['<!-- hi -->', 'comment'],
  ])('flags %s', (html, expected) => {
    expect(violations(html, true).join('\n')).toContain(expected);
  });

  it('passes what the renderer is meant to produce', () => {
    const good =
      '<h2 id="h-x">x</h2><p><a href="https://e.invalid/" title="t" rel="nofollow ugc noopener">a</a> <img src="/u/1.png" alt="" /></p>' +
      '<ul><li class="task-item" data-checked="true"><input type="checkbox" disabled checked /> x</li></ul>' +
      '<pre><code class="language-c++">x</code></pre><table><tr><td class="align-right">1</td></tr></table>';
    expect(violations(good, true)).toEqual([]);
  });
});

// A loop rather than describe.each so test names show the payload and its source in full.
const unsafeParser = markdownIt('commonmark', { html: true });

for (const payload of hostileMarkdown) {
  describe(`${payload.name} [${payload.source}]`, () => {
    it('renders to allow-listed HTML with safe URLs only', () => {
      expect(violations(renderMarkdown(payload.markdown).html, true)).toEqual([]);
    });

    if (payload.literalText) {
      const expected = payload.literalText;
      it('shows the template or markup as literal text', () => {
        const { text } = parse(renderMarkdown(payload.markdown).html);
        for (const literal of expected) expect(text).toContain(literal);
      });
    }

    // Defense in depth: with markdown-it's escaping out of the way (raw HTML on, as the
    // commonmark preset has it, and the payload fed straight in), the sanitizer alone holds.
    it('is made safe by the sanitizer alone', () => {
      expect(violations(sanitizeRendered(unsafeParser.render(payload.markdown)), false)).toEqual([]);
      expect(violations(sanitizeRendered(payload.markdown), false)).toEqual([]);
    });
  });
}
