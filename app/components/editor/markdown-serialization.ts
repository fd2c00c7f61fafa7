/**
 * How the editor writes Markdown where TipTap's own writer would change a writer's text on a
 * round trip or write something our renderer (markdown-it, api/markdown/render.ts) reads
 * differently. Each function here is pure, so the tests can pin its behaviour directly.
 */
import type { JSONContent, MarkdownRendererHelpers } from '@tiptap/core';

const ALNUM = /[\p{L}\p{N}]/u;

/**
 * Escapes plain text (never code) for Markdown.
 *
 * TipTap writes `<`, `>` and `&` as HTML entities, so "VCC > 3.3 V" would be stored as
 * "VCC &gt; 3.3 V" and every untouched line holding one of them would change on the first save
 * — noise in the revision history, needless merge conflicts and odd search text. Here they stay
 * as typed unless they could start something: `<` before a letter or `/ ! ?` (a tag or an
 * autolink) and `&` before an entity name get a backslash, `>` only at the start of a line.
 *
 * `_` between two letters or digits (`GPIO_NUM_35`) cannot start or end emphasis, so it is left
 * alone; every other emphasis, code, link and strike character is escaped as TipTap does. A line
 * that would read as a heading, quote, list item or thematic break gets the one backslash that
 * keeps it a paragraph.
 */
export function escapeMarkdownText(text: string): string {
  let out = '';
  for (let i = 0; i < text.length; i++) {
    const c = text[i]!;
    const before = text[i - 1];
    const after = text[i + 1];
    switch (c) {
      case '\\':
      case '`':
      case '*':
      case '[':
      case ']':
      case '~':
        out += `\\${c}`;
        break;
      case '_':
        out += before !== undefined && after !== undefined && ALNUM.test(before) && ALNUM.test(after) ? c : '\\_';
        break;
      case '<':
        out += after !== undefined && /[A-Za-z/!?]/.test(after) ? '\\<' : c;
        break;
      case '&':
        out += /^&(?:#[0-9]{1,7}|#[xX][0-9A-Fa-f]{1,6}|[A-Za-z][A-Za-z0-9]{1,31});/.test(text.slice(i)) ? '\\&' : c;
        break;
      default:
        out += c;
    }
  }
  return out.replace(
    /^([ \t]*)(#{1,6}(?=[ \t]|$)|>|[-+](?=[ \t]|$)|[-=]+(?=[ \t]*$)|(\d{1,9})([.)])(?=[ \t]|$))/gm,
    (...m) => {
      const [, indent, marker, digits, dot] = m as [string, string, string, string?, string?];
      return digits !== undefined ? `${indent}${digits}\\${dot}` : `${indent}\\${marker}`;
    },
  );
}

// --- Raw HTML -----------------------------------------------------------------------------------

/**
 * Raw HTML in Markdown, as CommonMark reads it: an open or closing tag, a comment, a processing
 * instruction, a declaration or CDATA. Our renderer runs with HTML off and shows all of these as
 * the characters they are, so the editor must too; TipTap would otherwise turn known tags into
 * formatting and silently drop unknown ones.
 */
const ATTRIBUTE = String.raw`\s+[A-Za-z_:][\w.:-]*(?:\s*=\s*(?:"[^"]*"|'[^']*'|[^\s"'=<>\x60]+))?`;
const INLINE_HTML = new RegExp(
  String.raw`^(?:<[A-Za-z][A-Za-z0-9-]*(?:${ATTRIBUTE})*\s*\/?>|<\/[A-Za-z][A-Za-z0-9-]*\s*>|<!--[\s\S]*?-->|<\?[\s\S]*?\?>|<![A-Za-z][^>]*>|<!\[CDATA\[[\s\S]*?\]\]>)`,
);

/** The raw HTML at the start of `src`, or null. */
export function inlineHtmlAt(src: string): string | null {
  return INLINE_HTML.exec(src)?.[0] ?? null;
}

const HTML_BLOCK_START = /^ {0,3}<(?:[A-Za-z][A-Za-z0-9-]*(?=[\s/>]|$)|\/[A-Za-z]|!--|\?|![A-Za-z]|!\[CDATA\[)/;
// Lines that start a block of their own and so end a paragraph (CommonMark's interruptions).
const INTERRUPTS = /^ {0,3}(?:#{1,6}(?:[ \t]|$)|>|```|~~~|[-*+][ \t]+\S|1[.)][ \t]+\S|(?:[-*_][ \t]*){3,}$)/;

/**
 * A paragraph that begins with raw HTML, which marked would read as an HTML block. With HTML
 * off it is an ordinary paragraph: it runs to a blank line or a line that starts another block.
 */
export function htmlParagraphAt(src: string): string | null {
  if (!HTML_BLOCK_START.test(src)) return null;
  const lines = src.split('\n');
  let end = 1;
  while (end < lines.length && lines[end]!.trim() !== '' && !INTERRUPTS.test(lines[end]!)) end++;
  return lines.slice(0, end).join('\n');
}

/** Undoes TipTap's entity encoding exactly (it encodes `&`, `<` and `>` and nothing else). */
export function decodeTipTapEntities(text: string): string {
  return text.replace(/&(amp|lt|gt);/g, (_, name: string) => (name === 'amp' ? '&' : name === 'lt' ? '<' : '>'));
}

/**
 * The end of a document: no trailing blank lines (an empty last paragraph) and no hard break with
 * nothing after it, whose backslash would otherwise be left standing as a visible character.
 */
export function trimDocumentEnd(markdown: string): string {
  const trimmed = markdown.replace(/(?:[ \t]*\n)+[ \t]*$/, '');
  if (trimmed === markdown) return markdown;
  const backslashes = /\\+$/.exec(trimmed)?.[0].length ?? 0;
  return backslashes % 2 === 1 ? trimmed.slice(0, -1) : trimmed;
}

/** A backtick fence longer than the longest run of backticks in the code. */
export function fenceFor(code: string): string {
  let longest = 0;
  for (const run of code.match(/`+/g) ?? []) longest = Math.max(longest, run.length);
  return '`'.repeat(Math.max(3, longest + 1));
}

export function textOf(node: JSONContent): string {
  if (typeof node.text === 'string') return node.text;
  return (node.content ?? []).map(textOf).join('');
}

/** A `|` inside a cell must be `\|`, in plain text and in code spans alike (GFM tables). */
function escapeCellPipes(cell: string): string {
  let out = '';
  let backslashes = 0;
  for (const c of cell) {
    if (c === '|' && backslashes % 2 === 0) out += '\\';
    out += c;
    backslashes = c === '\\' ? backslashes + 1 : 0;
  }
  return out;
}

type Align = 'left' | 'center' | 'right' | null;

function alignOf(cell: JSONContent): Align {
  const align = cell.attrs?.align;
  return align === 'left' || align === 'center' || align === 'right' ? align : null;
}

/**
 * A GFM table as people type one (`| Pin | Use |`, then `|---|---|`), cells not padded to a column width:
 * padding would rewrite every row whenever one cell grows, so a one-word edit would show as a
 * change to the whole table in the history and clash with any other edit to it. No blank lines
 * around it either (the document joins blocks with one already). A table cell is one line: the
 * editor does not make hard breaks in cells, and one that arrives anyway (pasted) is written as a
 * space — `<br>` would show as those four characters in our renderer, which has HTML off.
 */
export function renderGfmTable(node: JSONContent, helpers: MarkdownRendererHelpers): string {
  const rows = (node.content ?? []).map((row) =>
    (row.content ?? []).map((cell) => {
      const blocks = (cell.content ?? []).map((block) => helpers.renderChildren(block));
      const text = blocks
        .join('\n')
        .replace(/\\?[ \t]*\r?\n[ \t]*/g, ' ')
        .trim();
      return { text: escapeCellPipes(text), header: cell.type === 'tableHeader', align: alignOf(cell) };
    }),
  );
  const columns = Math.max(0, ...rows.map((row) => row.length));
  if (columns === 0) return '';

  const aligns = Array.from({ length: columns }, (_, i) => rows.find((row) => row[i]?.align)?.[i]?.align ?? null);
  const line = (cells: string[]) => `|${cells.map((text) => (text === '' ? ' ' : ` ${text} `)).join('|')}|`;
  const cellsOf = (row: { text: string }[]) => Array.from({ length: columns }, (_, i) => row[i]?.text ?? '');

  // Without a header row (only pasted tables lack one) an empty one keeps it a GFM table.
  const hasHeader = rows[0]!.some((cell) => cell.header);
  const header = hasHeader ? rows[0]! : [];
  const body = hasHeader ? rows.slice(1) : rows;
  const delimiter = aligns.map((align) =>
    align === 'left' ? ':---' : align === 'right' ? '---:' : align === 'center' ? ':---:' : '---',
  );

  return [line(cellsOf(header)), `|${delimiter.join('|')}|`, ...body.map((row) => line(cellsOf(row)))].join('\n');
}
