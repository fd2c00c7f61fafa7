/**
 * The editor's keyboard shortcuts, as TipTap defines them (plus Mod-K for the link dialog), in
 * one list for the toolbar tooltips and the "Keyboard shortcuts" help. `Mod` is Ctrl, or ⌘ on
 * Apple keyboards.
 */

export const SHORTCUTS = {
  bold: { label: 'Bold', keys: 'Mod-B' },
  italic: { label: 'Italic', keys: 'Mod-I' },
  strike: { label: 'Strikethrough', keys: 'Mod-Shift-S' },
  code: { label: 'Inline code', keys: 'Mod-E' },
  link: { label: 'Link', keys: 'Mod-K' },
  heading2: { label: 'Heading 2', keys: 'Mod-Alt-2' },
  heading3: { label: 'Heading 3', keys: 'Mod-Alt-3' },
  heading4: { label: 'Heading 4', keys: 'Mod-Alt-4' },
  paragraph: { label: 'Plain paragraph', keys: 'Mod-Alt-0' },
  bulletList: { label: 'Bulleted list', keys: 'Mod-Shift-8' },
  orderedList: { label: 'Numbered list', keys: 'Mod-Shift-7' },
  taskList: { label: 'Task list', keys: 'Mod-Shift-9' },
  blockquote: { label: 'Quote', keys: 'Mod-Shift-B' },
  codeBlock: { label: 'Code block', keys: 'Mod-Alt-C' },
  hardBreak: { label: 'Line break in a paragraph', keys: 'Shift-Enter' },
  indent: { label: 'Indent list item', keys: 'Tab' },
  outdent: { label: 'Outdent list item', keys: 'Shift-Tab' },
  undo: { label: 'Undo', keys: 'Mod-Z' },
  redo: { label: 'Redo', keys: 'Mod-Shift-Z' },
} as const satisfies Record<string, { label: string; keys: string }>;

export type ShortcutId = keyof typeof SHORTCUTS;

function isApple(): boolean {
  if (typeof navigator === 'undefined') return false;
  return /Mac|iPhone|iPad|iPod/i.test(navigator.platform || navigator.userAgent);
}

const APPLE: Record<string, string> = { Mod: '⌘', Alt: '⌥', Shift: '⇧', Enter: '↩' };
const OTHERS: Record<string, string> = { Mod: 'Ctrl', Alt: 'Alt', Shift: 'Shift', Enter: 'Enter' };

/** `Mod-Shift-Z` as the reader's keyboard shows it: "Ctrl+Shift+Z" or "⌘⇧Z". */
export function describeShortcut(keys: string, apple = isApple()): string {
  const names = apple ? APPLE : OTHERS;
  const parts = keys.split('-').map((key) => names[key] ?? key);
  return apple ? parts.join('') : parts.join('+');
}

/** The same in the `aria-keyshortcuts` syntax ("Control+Shift+Z", "Meta+Shift+Z"). */
export function ariaShortcut(keys: string, apple = isApple()): string {
  const names: Record<string, string> = { Mod: apple ? 'Meta' : 'Control', Alt: 'Alt', Shift: 'Shift' };
  return keys
    .split('-')
    .map((key) => names[key] ?? key)
    .join('+');
}

/** Languages offered for code blocks; any other word can be typed. */
export const CODE_LANGUAGES = [
  'c',
  'cpp',
  'rust',
  'python',
  'javascript',
  'typescript',
  'go',
  'arduino',
  'asm',
  'verilog',
  'vhdl',
  'json',
  'yaml',
  'toml',
  'ini',
  'bash',
  'shell',
  'makefile',
  'cmake',
  'text',
];
