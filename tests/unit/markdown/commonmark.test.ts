/**
 * CommonMark Spec 0.31.2 (spec.commonmark.org), examples via the commonmark-spec npm package,
 * run through `createMarkdownIt()` (markdown-it output before sanitizing, without heading ids).
 *
 * Which examples are compared:
 * - Skipped: the "HTML blocks" and "Raw HTML" sections whole (an HTML block can start with an
 *   incomplete tag such as `<div id="foo"`), and elsewhere every example whose markdown holds a
 *   raw HTML construct (open or closing tag, comment, processing instruction, declaration, CDATA;
 *   spec section 6.6) that the expected HTML reproduces verbatim. The spec passes such HTML
 *   through; Reworkbook escapes it (`html: false`). Tag-like text the spec itself escapes, e.g.
 *   in code spans or `\<br/>`, stays in. For the skipped examples a separate test checks that
 *   markdown-it makes no HTML tokens and the output holds only Markdown's own elements.
 * - Deliberate divergences, listed in DIVERGENT with the reason: links on schemes other than
 *   http, https and mailto; images whose source is not http(s) or an app path; fence languages
 *   that are not a plain token. (Task lists would diverge too; no spec example has one.)
 *
 * Comparison ignores whitespace next to block-level tags and the XHTML slash of void elements.
 */
import { createRequire } from 'node:module';
import { Parser } from 'htmlparser2';
import { describe, expect, it } from 'vitest';
import { createMarkdownIt } from '../../../api/markdown/render';

interface SpecExample {
  markdown: string;
  html: string;
  section: string;
  number: number;
}

// commonmark-spec is CommonJS without types; it parses spec.txt into examples on load.
const { tests } = createRequire(import.meta.url)('commonmark-spec') as { tests: SpecExample[] };

// The spec shows tabs as →.
const examples = tests.map((example) => ({
  ...example,
  markdown: example.markdown.replaceAll('→', '\t'),
  html: example.html.replaceAll('→', '\t'),
}));

const ATTRIBUTE = String.raw`\s+[A-Za-z_:][A-Za-z0-9_.:-]*(?:\s*=\s*(?:[^"'=<>\x60\s]+|'[^']*'|"[^"]*"))?`;
const RAW_HTML = new RegExp(
  [
    String.raw`<[A-Za-z][A-Za-z0-9-]*(?:${ATTRIBUTE})*\s*\/?>`,
    String.raw`<\/[A-Za-z][A-Za-z0-9-]*\s*>`,
    String.raw`<!-->`,
    String.raw`<!--->`,
    String.raw`<!--[\s\S]*?-->`,
    String.raw`<\?[\s\S]*?\?>`,
    String.raw`<![A-Za-z][^>]*>`,
    String.raw`<!\[CDATA\[[\s\S]*?\]\]>`,
  ].join('|'),
  'g',
);

const RAW_HTML_SECTIONS = new Set(['HTML blocks', 'Raw HTML']);

function passesRawHtmlThrough(example: SpecExample): boolean {
  if (RAW_HTML_SECTIONS.has(example.section)) return true;
  return (example.markdown.match(RAW_HTML) ?? []).some((construct) => example.html.includes(construct));
}

const SCHEME = 'the link policy refuses this scheme';
const IMAGE = 'images need an http(s) or app-path source; a relative one shows its alt text';
const LANGUAGE = 'a fence language that is not a plain ASCII token gets no class';

const DIVERGENT: Record<number, string> = {
  34: `${LANGUAGE} (föö)`,
  144: `${LANGUAGE} (;)`,
  517: `${IMAGE} (moon.jpg)`,
  520: `${IMAGE} (uri3)`,
  531: `${IMAGE} (moon.jpg)`,
  573: `${IMAGE} (train.jpg)`,
  576: `${IMAGE} (train.jpg)`,
  577: `${IMAGE} (train.jpg)`,
  578: `${IMAGE} (train.jpg)`,
  580: `${IMAGE} (url)`,
  596: `${SCHEME} (irc:)`,
  598: `${SCHEME} (a+b+c:)`,
  599: `${SCHEME} (made-up-scheme:)`,
  601: `${SCHEME} (localhost:)`,
};

/** Pass count when this list was written; raise it when the renderer gets closer to the spec. */
const MIN_PASSING = 559;

const BLOCK_TAG = String.raw`<\/?(?:p|h[1-6]|ul|ol|li|blockquote|pre|hr|table|thead|tbody|tr|th|td|div)\b[^>]*>`;

function normalise(html: string): string {
  return html
    .replace(/\s*\/>/g, '>')
    .replace(new RegExp(String.raw`\s*(${BLOCK_TAG})\s*`, 'g'), '$1')
    .trim();
}

const md = createMarkdownIt();
const compared = examples.filter((example) => !passesRawHtmlThrough(example) && !(example.number in DIVERGENT));
const rawHtml = examples.filter(passesRawHtmlThrough);
const divergent = examples.filter((example) => example.number in DIVERGENT);

describe('CommonMark spec examples', () => {
  it.each(compared)('example $number ($section)', (example) => {
    expect(normalise(md.render(example.markdown))).toBe(normalise(example.html));
  });

  it(`compares at least ${MIN_PASSING} examples`, () => {
    expect(examples.length).toBe(652);
    expect(compared.length).toBeGreaterThanOrEqual(MIN_PASSING);
    expect(rawHtml.length + divergent.length + compared.length).toBe(examples.length);
  });

  // Keeps the list honest: an entry that starts matching the spec must leave the list.
  it.each(divergent)('example $number still diverges on purpose', (example) => {
    expect(normalise(md.render(example.markdown)), DIVERGENT[example.number]).not.toBe(normalise(example.html));
  });
});

describe('CommonMark examples with raw HTML', () => {
  const MARKDOWN_TAGS = new Set([
    'p',
    'h1',
    'h2',
    'h3',
    'h4',
    'h5',
    'h6',
    'a',
    'img',
    'em',
    'strong',
    'code',
    'pre',
    'blockquote',
    'ul',
    'ol',
    'li',
    'hr',
    'br',
  ]);

  function htmlTokens(markdown: string): string[] {
    const tokens = md.parse(markdown, {});
    return [...tokens, ...tokens.flatMap((token) => token.children ?? [])]
      .filter((token) => token.type === 'html_block' || token.type === 'html_inline')
      .map((token) => token.content);
  }

  it.each(rawHtml)('example $number keeps its HTML as text', (example) => {
    expect(htmlTokens(example.markdown)).toEqual([]);
    const found: string[] = [];
    const parser = new Parser({
      onopentag(name) {
        if (!MARKDOWN_TAGS.has(name)) found.push(`<${name}>`);
      },
      oncomment(comment) {
        found.push(`<!--${comment}-->`);
      },
      onprocessinginstruction(name) {
        found.push(`<${name}>`);
      },
    });
    parser.write(md.render(example.markdown));
    parser.end();
    expect(found).toEqual([]);
  });
});
