/**
 * The one set of TipTap extensions behind the rich editor. Markdown is the stored form, so every
 * node and mark here must survive Markdown → editor → Markdown; the round-trip tests load this
 * same list (tests/unit/editor/markdown-roundtrip.test.ts), and a server-side check can too.
 *
 * Choices a reader might question:
 * - Underline is left out: Markdown has no underline, and TipTap's `++text++` is not something
 *   our renderer (markdown-it, default preset) understands, so it would be lost on publishing.
 * - Headings are H2–H4 in the toolbar and input rules (H1 is the page title). A stored `#` or
 *   `#####` heading still loads and is written back unchanged.
 * - Hard breaks are written as a backslash at the line end, not two trailing spaces, so they are
 *   visible in diffs and survive editors that trim trailing whitespace.
 * - Plain text is escaped by `escapeMarkdownText` (markdown-serialization.ts) instead of TipTap's
 *   HTML entities, tables are written without the blank lines and unescaped pipes TipTap leaves,
 *   and code fences grow past any run of backticks inside the code.
 */
import { Extension, flattenExtensions, type AnyExtension, type Node } from '@tiptap/core';
import { Image } from '@tiptap/extension-image';
import { TaskItem, TaskList } from '@tiptap/extension-list';
import { Table, TableCell, TableHeader, TableRow } from '@tiptap/extension-table';
import { Placeholder } from '@tiptap/extensions';
import { Markdown } from '@tiptap/markdown';
import { StarterKit } from '@tiptap/starter-kit';
import { isSafeLinkHref } from './link-policy';
import {
  decodeTipTapEntities,
  escapeMarkdownText,
  fenceFor,
  htmlParagraphAt,
  inlineHtmlAt,
  renderGfmTable,
  textOf,
  trimDocumentEnd,
} from './markdown-serialization';

export interface EditorExtensionOptions {
  /** Shown in the empty editor. */
  placeholder?: string;
}

/** Heading levels the toolbar offers. */
export const HEADING_LEVELS = [2, 3, 4] as const;
export type HeadingLevel = (typeof HEADING_LEVELS)[number];

/**
 * One of TipTap's own nodes as the starter kit builds it. The code block and hard break packages
 * are not direct dependencies of ours, so they are taken from the kit instead of imported.
 */
function starterKitNode(name: 'codeBlock' | 'hardBreak'): Node {
  const found = flattenExtensions([StarterKit]).find((extension) => extension.name === name);
  if (!found || found.type !== 'node') throw new Error(`The TipTap starter kit no longer provides "${name}".`);
  return found as Node;
}

const FencedCodeBlock = starterKitNode('codeBlock').extend({
  renderMarkdown(node) {
    const code = textOf(node);
    const language = typeof node.attrs?.language === 'string' ? node.attrs.language : '';
    const fence = fenceFor(code);
    return `${fence}${language}\n${code}\n${fence}`;
  },
});

const BackslashHardBreak = starterKitNode('hardBreak').extend({
  renderMarkdown: () => '\\\n',
  addKeyboardShortcuts() {
    // A GFM table cell is one line, so a hard break there could not be stored (see renderGfmTable).
    const insert = () =>
      this.editor.isActive('tableCell') || this.editor.isActive('tableHeader') || this.editor.commands.setHardBreak();
    return { 'Mod-Enter': insert, 'Shift-Enter': insert };
  },
});

/** Raw HTML inside a line stays the characters it is (see inlineHtmlAt). */
const LiteralInlineHtml = Extension.create({
  name: 'literalInlineHtml',
  markdownTokenName: 'literalInlineHtml',
  markdownTokenizer: {
    name: 'literalInlineHtml',
    level: 'inline',
    start: (src) => src.indexOf('<'),
    tokenize: (src) => {
      const raw = inlineHtmlAt(src);
      return raw ? { type: 'literalInlineHtml', raw, text: raw } : undefined;
    },
  },
  parseMarkdown: (token, helpers) => helpers.createTextNode(token.raw ?? ''),
});

/** A paragraph starting with raw HTML stays a paragraph of text (see htmlParagraphAt). */
const LiteralHtmlParagraph = Extension.create({
  name: 'literalHtmlParagraph',
  markdownTokenName: 'literalHtmlParagraph',
  markdownTokenizer: {
    name: 'literalHtmlParagraph',
    level: 'block',
    // Never interrupts a paragraph: with HTML off, a tag inside a paragraph is just text.
    start: () => -1,
    tokenize: (src, _tokens, lexer) => {
      const raw = htmlParagraphAt(src);
      return raw ? { type: 'literalHtmlParagraph', raw, text: raw, tokens: lexer.inlineTokens(raw.trim()) } : undefined;
    },
  },
  parseMarkdown: (token, helpers) => helpers.createNode('paragraph', {}, helpers.parseInline(token.tokens ?? [])),
});

const GfmTable = Table.extend({
  renderMarkdown: (node, helpers) => renderGfmTable(node, helpers),
});

// Alt text and title are written so that a `]` or `"` in them cannot end the image early.
const escapeAlt = (alt: string) => alt.replace(/[\\[\]]/g, (c) => `\\${c}`);
const escapeTitle = (title: string) => title.replace(/["\\]/g, (c) => `\\${c}`);
const writeDestination = (url: string) =>
  /[\s()<>]/.test(url) ? `<${url.replace(/[<>]/g, (c) => encodeURIComponent(c))}>` : url;

const MarkdownImage = Image.extend({
  renderMarkdown(node) {
    const src = writeDestination(String(node.attrs?.src ?? ''));
    const alt = escapeAlt(String(node.attrs?.alt ?? ''));
    const title = node.attrs?.title ? ` "${escapeTitle(String(node.attrs.title))}"` : '';
    return `![${alt}](${src}${title})`;
  },
});

/** The part of TipTap's Markdown manager this module replaces (not in its public types). */
interface TextEscaping {
  escapeMarkdownSyntax?: (entityEncodedText: string) => string;
}

const ReworkbookMarkdown = Markdown.extend({
  onBeforeCreate(event) {
    this.parent?.(event);
    // TipTap escapes text in one private step; if a later version renames it, its own escaping
    // stays in place and the round-trip tests say so.
    const manager = this.editor.markdown as unknown as TextEscaping | undefined;
    if (manager && typeof manager.escapeMarkdownSyntax === 'function') {
      manager.escapeMarkdownSyntax = (encoded) => escapeMarkdownText(decodeTipTapEntities(encoded));
    }
    // The editor keeps an empty paragraph after a final heading, list or table so the cursor can
    // get below it; that paragraph is no content, and must not add blank lines to the document.
    const serialize = this.editor.getMarkdown;
    this.editor.getMarkdown = () => trimDocumentEnd(serialize());
  },
});

export function editorExtensions(options: EditorExtensionOptions = {}): AnyExtension[] {
  const extensions: AnyExtension[] = [
    StarterKit.configure({
      heading: { levels: [...HEADING_LEVELS] },
      underline: false,
      codeBlock: false,
      hardBreak: false,
      link: {
        openOnClick: false,
        autolink: true,
        linkOnPaste: true,
        defaultProtocol: 'https',
        isAllowedUri: (url) => isSafeLinkHref(url),
        HTMLAttributes: { rel: 'noopener noreferrer nofollow', target: null },
      },
    }),
    // Tab is left to the browser in code blocks, so keyboard users can always leave the editor.
    FencedCodeBlock.configure({ languageClassPrefix: 'language-', enableTabIndentation: false }),
    BackslashHardBreak,
    TaskList,
    TaskItem.configure({ nested: true }),
    GfmTable.configure({ resizable: false }),
    TableRow,
    TableHeader,
    TableCell,
    MarkdownImage.configure({ inline: false, allowBase64: false }),
    LiteralInlineHtml,
    LiteralHtmlParagraph,
    ReworkbookMarkdown.configure({ indentation: { style: 'space', size: 2 } }),
  ];
  if (options.placeholder) extensions.push(Placeholder.configure({ placeholder: options.placeholder }));
  return extensions;
}
