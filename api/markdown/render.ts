/**
 * The one place Markdown becomes HTML on the server. Members write build write-ups that other
 * people read, and the client shows the result with `v-html`, so everything here assumes the
 * input is hostile:
 *
 * - markdown-it runs on its default preset with raw HTML off (the `commonmark` preset turns it
 *   on), a strict link policy and a low nesting limit;
 * - its output always goes through sanitize-html with an allow-list of exactly what this renderer
 *   can produce, so a markdown-it bug or a future plugin cannot smuggle in anything that runs;
 * - heading ids carry a prefix, so a heading can never take over an id the app's own DOM uses;
 * - an image that is one of our uploads (`/api/uploads/<id>/…`) is drawn from the `images` map the
 *   caller resolved for the page (srcset, size, alt text); one the map does not know — another
 *   project's, a deleted one — shows as its alt text, and srcset can only name our own files.
 */
import markdownIt, { type MarkdownIt, type StateCore, type Token } from 'markdown-it';
import sanitizeHtml from 'sanitize-html';
import { AppError } from '../http/errors';

/** Longest Markdown document we render; well above any real write-up, far below what hurts. */
export const MAX_MARKDOWN_CHARS = 200_000;

/** Deep enough for real nested lists and quotes; markdown-it drops content nested deeper. */
const MAX_NESTING = 20;

export interface TocEntry {
  level: number;
  id: string;
  text: string;
}

export interface RenderedMarkdown {
  html: string;
  toc: TocEntry[];
}

/** An uploaded photo as the page shows it (api/uploads/images.ts builds these). */
export interface MarkdownImage {
  /** App-relative URL of the file to show. */
  src: string;
  srcset: string | null;
  sizes: string | null;
  width: number | null;
  height: number | null;
  /** The upload's alt text, used when the Markdown gives none. */
  alt: string;
}

export interface RenderOptions {
  /** Prefix of every heading id; defaults to `h-`. */
  idPrefix?: string;
  /**
   * Uploads the page may show, by upload id (decimal string). Given, every image pointing at
   * `/api/uploads/<id>/…` is resolved through it; without it such images are left as written.
   */
  images?: ReadonlyMap<string, MarkdownImage>;
}

// --- link policy -----------------------------------------------------------------------------

const SCHEME = /^([A-Za-z][A-Za-z0-9+.-]*):/;
const LINK_SCHEMES: ReadonlySet<string> = new Set(['http', 'https', 'mailto']);
const IMAGE_SCHEMES: ReadonlySet<string> = new Set(['http', 'https']);
// Characters a browser ignores inside a URL (tab, newline: anywhere; C0 controls and spaces: at
// the ends) plus invisible ones that look like nothing on screen. Dropping all of them everywhere
// is stricter than any browser, which is the direction we want to err in.
const IGNORABLE = /[\u0000-\u0020\u007F-\u00A0\u00AD\u1680\u180E\u2000-\u200F\u2028-\u202F\u205F-\u2064\u3000\uFEFF]/g;

const { unescapeAll, escapeHtml } = markdownIt().utils;

function decodeOnce(value: string): string {
  return unescapeAll(value).replace(/%([0-9A-Fa-f]{2})/g, (_, hex: string) =>
    String.fromCharCode(Number.parseInt(hex, 16)),
  );
}

/**
 * What the scheme check looks at: the URL with character references and percent-escapes decoded
 * (repeatedly, so double encoding does not hide a scheme) and ignorable characters removed.
 * Browsers do not percent-decode a scheme, so this can only make the check stricter.
 */
function inspectable(url: string): string {
  let current = url;
  for (let round = 0; round < 4; round++) {
    const next = decodeOnce(current);
    if (next === current) break;
    current = next;
  }
  return current.replace(IGNORABLE, '');
}

type UrlKind =
  { kind: 'scheme'; scheme: string } | { kind: 'app-path' } | { kind: 'network-path' } | { kind: 'relative' };

function classifyUrl(url: string): UrlKind {
  const value = inspectable(url);
  const scheme = SCHEME.exec(value);
  if (scheme) return { kind: 'scheme', scheme: scheme[1]!.toLowerCase() };
  // Browsers read a backslash as a slash in http(s) URLs, so `/\host` is a network path too.
  if (/^[/\\]{2}/.test(value)) return { kind: 'network-path' };
  if (value.startsWith('/') || value.startsWith('\\')) return { kind: 'app-path' };
  return { kind: 'relative' };
}

/** Links: http, https, mailto, app paths, fragments and scheme-less relative paths. */
export function isAllowedLinkUrl(url: string): boolean {
  const kind = classifyUrl(url);
  if (kind.kind === 'scheme') return LINK_SCHEMES.has(kind.scheme);
  return kind.kind === 'app-path' || kind.kind === 'relative';
}

/**
 * Images: http, https and app paths only. A relative image path would resolve against whatever
 * page shows the write-up, and uploads live under an app path, so it can only be a mistake.
 */
export function isAllowedImageUrl(url: string): boolean {
  const kind = classifyUrl(url);
  if (kind.kind === 'scheme') return IMAGE_SCHEMES.has(kind.scheme);
  return kind.kind === 'app-path';
}

// --- per-document state ----------------------------------------------------------------------

// Kept under a symbol in markdown-it's env so it can never collide with markdown-it's own keys.
const DOCUMENT = Symbol('reworkbook.markdown.document');

interface DocumentState {
  idPrefix: string;
  usedIds: Set<string>;
  /** Next suffix to try per base id, so thousands of equal headings stay linear. */
  nextSuffix: Map<string, number>;
  toc: TocEntry[];
  images?: ReadonlyMap<string, MarkdownImage>;
}

function documentOf(state: StateCore): DocumentState | undefined {
  return state.env[DOCUMENT] as DocumentState | undefined;
}

// --- core rules ------------------------------------------------------------------------------

const TASK_MARKER = /^\[([ xX])\](?:[ \t]+|$)/;

/**
 * `- [ ] todo` / `- [x] done`, as the rich editor writes task lists. The marker is cut off
 * before inline parsing, so it is never mistaken for a link label and the rest of the line
 * parses as usual; the checkbox is added to the parsed line afterwards.
 */
function taskMarkers(state: StateCore): void {
  const tokens = state.tokens;
  for (let i = 2; i < tokens.length; i++) {
    const inline = tokens[i]!;
    if (inline.type !== 'inline' || tokens[i - 1]!.type !== 'paragraph_open') continue;
    const item = tokens[i - 2]!;
    if (item.type !== 'list_item_open') continue;
    const marker = TASK_MARKER.exec(inline.content);
    if (!marker) continue;
    const checked = marker[1] !== ' ';
    inline.content = inline.content.slice(marker[0].length);
    inline.meta = { ...(inline.meta as object | null), taskChecked: checked };
    item.attrJoin('class', 'task-item');
    item.attrSet('data-checked', String(checked));
  }
}

function taskCheckboxes(state: StateCore): void {
  for (const token of state.tokens) {
    const checked = (token.meta as { taskChecked?: boolean } | null)?.taskChecked;
    if (token.type !== 'inline' || checked === undefined) continue;
    const checkbox = new state.Token('task_checkbox', 'input', 0);
    checkbox.meta = { checked };
    token.children = [checkbox, ...(token.children ?? [])];
  }
}

/** Replaces each image the policy refuses with its alt content, so the reader still sees it. */
function withImagePolicy(children: Token[]): Token[] {
  const result: Token[] = [];
  for (const child of children) {
    if (child.type !== 'image') {
      result.push(child);
      continue;
    }
    const alt = withImagePolicy(child.children ?? []);
    if (isAllowedImageUrl(String(child.attrGet('src') ?? ''))) {
      child.children = alt;
      result.push(child);
    } else {
      result.push(...alt);
    }
  }
  return result;
}

function imagePolicy(state: StateCore): void {
  for (const token of state.tokens) {
    if (token.type === 'inline' && token.children) token.children = withImagePolicy(token.children);
  }
}

/** An app path to one of our uploaded files: `/api/uploads/<id>/<name>.<ext>`. */
export const UPLOAD_FILE_URL = /^\/api\/uploads\/(\d{1,9})\/[a-z]+\.[a-z0-9]+$/;

function withUploadedImages(children: Token[], images: ReadonlyMap<string, MarkdownImage>, state: StateCore): Token[] {
  const result: Token[] = [];
  for (const child of children) {
    if (child.type !== 'image') {
      result.push(child);
      continue;
    }
    const alt = withUploadedImages(child.children ?? [], images, state);
    const id = UPLOAD_FILE_URL.exec(String(child.attrGet('src') ?? ''))?.[1];
    if (id === undefined) {
      child.children = alt;
      result.push(child);
      continue;
    }
    const image = images.get(id);
    if (!image || !UPLOAD_FILE_URL.test(image.src)) {
      // Not an upload this page may show: the reader gets the words, and no request is made.
      result.push(...alt);
      continue;
    }
    child.attrSet('src', image.src);
    if (image.srcset) child.attrSet('srcset', image.srcset);
    if (image.srcset && image.sizes) child.attrSet('sizes', image.sizes);
    if (image.width) child.attrSet('width', String(image.width));
    if (image.height) child.attrSet('height', String(image.height));
    child.attrSet('loading', 'lazy');
    child.attrSet('decoding', 'async');
    if (!collapse(textOf(alt)) && image.alt) {
      const text = new state.Token('text', '', 0);
      text.content = image.alt;
      child.children = [text];
    } else {
      child.children = alt;
    }
    result.push(child);
  }
  return result;
}

function uploadedImages(state: StateCore): void {
  const images = documentOf(state)?.images;
  if (!images) return;
  for (const token of state.tokens) {
    if (token.type === 'inline' && token.children) token.children = withUploadedImages(token.children, images, state);
  }
}

const ALIGNMENTS: ReadonlySet<string> = new Set(['left', 'center', 'right']);

/** Table alignment as a class, so the sanitizer can refuse every `style` attribute. */
function tableAlignment(state: StateCore): void {
  for (const token of state.tokens) {
    if (token.type !== 'th_open' && token.type !== 'td_open') continue;
    const style = token.attrGet('style');
    if (typeof style !== 'string') continue;
    token.attrs = (token.attrs ?? []).filter(([name]) => name !== 'style');
    const align = /^text-align:(\w+)$/.exec(style)?.[1];
    if (align && ALIGNMENTS.has(align)) token.attrJoin('class', `align-${align}`);
  }
}

function textOf(children: readonly Token[]): string {
  let text = '';
  for (const child of children) {
    if (child.type === 'text' || child.type === 'text_special' || child.type === 'code_inline') text += child.content;
    else if (child.type === 'softbreak' || child.type === 'hardbreak') text += ' ';
    else if (child.type === 'image') text += textOf(child.children ?? []);
  }
  return text;
}

function collapse(text: string): string {
  return text.replace(/\s+/g, ' ').trim();
}

/**
 * Keeps letters of every script (not only ASCII, unlike the URL slug in shared/text.ts), so a
 * heading written in any language gets a readable anchor; only Latin accents are folded.
 */
function headingSlug(text: string): string {
  const slug = text
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .normalize('NFC')
    .toLowerCase()
    .replace(/[^\p{L}\p{N}]+/gu, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 64)
    .replace(/-+$/g, '');
  return slug || 'section';
}

function headingIds(state: StateCore): void {
  const doc = documentOf(state);
  if (!doc) return;
  const tokens = state.tokens;
  for (let i = 0; i < tokens.length; i++) {
    const open = tokens[i]!;
    if (open.type !== 'heading_open') continue;
    const text = collapse(textOf(tokens[i + 1]?.children ?? []));
    const base = `${doc.idPrefix}${headingSlug(text)}`;
    let id = base;
    let n = doc.nextSuffix.get(base) ?? 2;
    while (doc.usedIds.has(id)) id = `${base}-${n++}`;
    doc.nextSuffix.set(base, n);
    doc.usedIds.add(id);
    open.attrSet('id', id);
    const level = Number(open.tag.slice(1));
    if (level <= 4) doc.toc.push({ level, id, text });
  }
}

// --- renderer rules --------------------------------------------------------------------------

const LANGUAGE_TOKEN = '[A-Za-z0-9_+#.-]{1,32}';
const SAFE_LANGUAGE = new RegExp(`^${LANGUAGE_TOKEN}$`);

/**
 * A markdown-it instance with Reworkbook's syntax and link policy. Heading ids and the table of
 * contents need per-document state and come only through `renderMarkdown`; output of this
 * instance alone is not sanitized and must not reach a browser.
 */
export function createMarkdownIt(): MarkdownIt {
  const md = markdownIt('default', {
    html: false,
    linkify: false,
    typographer: false,
    breaks: false,
    xhtmlOut: false,
    maxNesting: MAX_NESTING,
  });

  md.validateLink = isAllowedLinkUrl;

  md.core.ruler.before('inline', 'task_markers', taskMarkers);
  md.core.ruler.after('inline', 'task_checkboxes', taskCheckboxes);
  md.core.ruler.push('image_policy', imagePolicy);
  md.core.ruler.push('uploaded_images', uploadedImages);
  md.core.ruler.push('table_alignment', tableAlignment);
  md.core.ruler.push('heading_ids', headingIds);

  md.renderer.rules.task_checkbox = (tokens, idx) => {
    const checked = (tokens[idx]!.meta as { checked: boolean }).checked;
    return `<input type="checkbox" disabled${checked ? ' checked' : ''}> `;
  };

  // The default fence rule copies the first word of the info string into the class; only a
  // plain language token is worth keeping, anything else is noise or an attack.
  md.renderer.rules.fence = (tokens, idx) => {
    const token = tokens[idx]!;
    const language = unescapeAll(token.info).trim().split(/\s+/)[0] ?? '';
    const className = SAFE_LANGUAGE.test(language) ? ` class="language-${escapeHtml(language)}"` : '';
    return `<pre><code${className}>${escapeHtml(token.content)}</code></pre>\n`;
  };

  return md;
}

// --- sanitizer -------------------------------------------------------------------------------

const LINK_REL = 'nofollow ugc noopener';
const DEFAULT_ID_PREFIX = 'h-';
const HEADINGS = ['h1', 'h2', 'h3', 'h4', 'h5', 'h6'] as const;
const ALIGN_CLASSES = ['align-left', 'align-center', 'align-right'];

const BASE_OPTIONS: sanitizeHtml.IOptions = {
  allowedTags: [
    ...HEADINGS,
    'p',
    'a',
    'img',
    'strong',
    'em',
    's',
    'code',
    'pre',
    'blockquote',
    'ul',
    'ol',
    'li',
    'input',
    'table',
    'thead',
    'tbody',
    'tr',
    'th',
    'td',
    'hr',
    'br',
  ],
  allowedAttributes: {
    ...Object.fromEntries(HEADINGS.map((tag) => [tag, ['id']])),
    a: ['href', 'title', 'rel'],
    img: [
      'src',
      'alt',
      'title',
      'width',
      'height',
      'srcset',
      'sizes',
      { name: 'loading', multiple: false, values: ['lazy'] },
      { name: 'decoding', multiple: false, values: ['async'] },
    ],
    ol: ['start'],
    li: [{ name: 'data-checked', multiple: false, values: ['true', 'false'] }],
    input: ['type', 'checked', 'disabled'],
  },
  // `class` is deliberately absent from allowedAttributes: listed there it would let any class through.
  allowedClasses: {
    code: [new RegExp(`^language-${LANGUAGE_TOKEN}$`)],
    li: ['task-item'],
    th: ALIGN_CLASSES,
    td: ALIGN_CLASSES,
  },
  allowedSchemes: ['http', 'https', 'mailto'],
  allowedSchemesByTag: { img: ['http', 'https'] },
  allowedSchemesAppliedToAttributes: ['href', 'src'],
  allowProtocolRelative: false,
  allowedStyles: {},
  disallowedTagsMode: 'discard',
};

const ID_CHARS = /^[\p{L}\p{N}_-]+$/u;

// What the renderer itself writes into srcset and sizes, and nothing else: srcset names only our
// uploaded files (app paths, never another host), sizes is one media condition and two lengths.
const SRCSET_CANDIDATE = '/api/uploads/\\d{1,9}/[a-z]+\\.[a-z0-9]+ \\d{1,5}w';
const SRCSET = new RegExp(`^${SRCSET_CANDIDATE}(?:, ${SRCSET_CANDIDATE})*$`);
const SIZES = /^\((?:max|min)-width: \d{1,5}px\) \d{1,3}vw, \d{1,5}px$/;
const DIMENSION = /^\d{1,5}$/;

const imageTransform: sanitizeHtml.Transformer = (tagName, attribs) => {
  const kept: sanitizeHtml.Attributes = { ...attribs };
  if (kept.srcset !== undefined && !SRCSET.test(kept.srcset)) delete kept.srcset;
  if (kept.sizes !== undefined && (!SIZES.test(kept.sizes) || kept.srcset === undefined)) delete kept.sizes;
  for (const name of ['width', 'height'] as const)
    if (kept[name] !== undefined && !DIMENSION.test(kept[name])) delete kept[name];
  if (kept.loading !== undefined && kept.loading !== 'lazy') delete kept.loading;
  if (kept.decoding !== undefined && kept.decoding !== 'async') delete kept.decoding;
  return { tagName, attribs: kept };
};

function optionsFor(idPrefix: string): sanitizeHtml.IOptions {
  const heading: sanitizeHtml.Transformer = (tagName, attribs) => {
    const id = attribs.id;
    // Only ids this renderer made may stay: anything else could shadow an element of the app.
    const kept: sanitizeHtml.Attributes =
      id !== undefined && id.startsWith(idPrefix) && ID_CHARS.test(id) ? { id } : {};
    return { tagName, attribs: kept };
  };
  return {
    ...BASE_OPTIONS,
    transformTags: {
      ...Object.fromEntries(HEADINGS.map((tag) => [tag, heading])),
      // Every link gets the same rel, whatever came before: user content earns no ranking and
      // gets no handle on this window.
      a: sanitizeHtml.simpleTransform('a', { rel: LINK_REL }),
      img: imageTransform,
      // The only input the renderer makes is a read-only checkbox; any other kind is a form field.
      input: (tagName, attribs) => ({
        tagName,
        attribs: { type: 'checkbox', disabled: '', ...('checked' in attribs ? { checked: '' } : {}) },
      }),
    },
  };
}

/**
 * The allow-list pass over renderer output. Exported so tests can prove it holds on its own,
 * without markdown-it's escaping in front of it.
 */
export function sanitizeRendered(html: string, idPrefix = DEFAULT_ID_PREFIX): string {
  return sanitizeHtml(html, optionsFor(idPrefix));
}

// --- entry points ----------------------------------------------------------------------------

const md = createMarkdownIt();
const ID_PREFIX = /^[A-Za-z][A-Za-z0-9_-]{0,15}$/;

function assertWithinLimit(markdown: string): void {
  if (markdown.length > MAX_MARKDOWN_CHARS) {
    throw new AppError(
      'payload_too_large',
      `Markdown is at most ${MAX_MARKDOWN_CHARS.toLocaleString('en')} characters.`,
      { limit: MAX_MARKDOWN_CHARS, length: markdown.length },
    );
  }
}

/** Markdown to sanitized HTML plus the h1–h4 table of contents. */
export function renderMarkdown(markdown: string, options: RenderOptions = {}): RenderedMarkdown {
  assertWithinLimit(markdown);
  const idPrefix = options.idPrefix ?? DEFAULT_ID_PREFIX;
  // The prefix is ours, not the author's; a bad one is a programming error.
  if (!ID_PREFIX.test(idPrefix)) throw new TypeError(`Invalid heading id prefix: ${JSON.stringify(idPrefix)}`);
  const doc: DocumentState = {
    idPrefix,
    usedIds: new Set(),
    nextSuffix: new Map(),
    toc: [],
    ...(options.images ? { images: options.images } : {}),
  };
  const html = sanitizeRendered(md.render(markdown, { [DOCUMENT]: doc }), idPrefix);
  return { html, toc: doc.toc };
}

const BLOCK_CODE: ReadonlySet<string> = new Set(['fence', 'code_block']);

/** The words of a document without markup, blocks on their own lines (for search snippets). */
export function plainTextOf(markdown: string): string {
  assertWithinLimit(markdown);
  const blocks: string[] = [];
  for (const token of md.parse(markdown, {})) {
    const text =
      token.type === 'inline' ? textOf(token.children ?? []) : BLOCK_CODE.has(token.type) ? token.content : '';
    const line = collapse(text);
    if (line) blocks.push(line);
  }
  return blocks.join('\n');
}

/** Every image source and link target in a document, with each image's alt text (for upload references). */
export function linkTargetsOf(markdown: string): { images: { src: string; alt: string }[]; links: string[] } {
  assertWithinLimit(markdown);
  const found = { images: [] as { src: string; alt: string }[], links: [] as string[] };
  const visit = (tokens: readonly Token[]) => {
    for (const token of tokens) {
      if (token.type === 'image')
        found.images.push({ src: String(token.attrGet('src') ?? ''), alt: collapse(textOf(token.children ?? [])) });
      else if (token.type === 'link_open') found.links.push(String(token.attrGet('href') ?? ''));
      if (token.children) visit(token.children);
    }
  };
  visit(md.parse(markdown, {}));
  return found;
}
