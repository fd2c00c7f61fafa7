/**
 * Files pasted, dropped or picked into the rich editor, and the placeholders shown while they
 * upload.
 *
 * A placeholder is a widget decoration, not a node: the local preview (a `blob:` URL) is never
 * part of the document, so it can never reach the Markdown, a saved revision or a draft. Its
 * position is mapped through every edit; when the upload is ready the real image (or link) is
 * inserted where the placeholder stands and the placeholder goes, in one transaction. Files added
 * together keep their order whichever finishes first.
 *
 * The same plugin marks images that have no alt text yet, so a skipped description stays visible.
 */
import { Extension, type Editor, type JSONContent } from '@tiptap/core';
import type { Node as PmNode } from '@tiptap/pm/model';
import { Plugin, PluginKey, type EditorState, type Transaction } from '@tiptap/pm/state';
import { Decoration, DecorationSet, type EditorView } from '@tiptap/pm/view';

export interface UploadPlaceholder {
  key: string;
  pos: number;
  /** Placeholders added together (one paste, one drop, one pick) share a group … */
  group: number;
  /** … and keep this order in it. */
  index: number;
  kind: 'image' | 'file';
  name: string;
  /** `blob:` URL of the local file, for images. */
  previewUrl: string | null;
  /** Share sent, 0 to 1. */
  fraction: number;
}

export type NewPlaceholder = Pick<UploadPlaceholder, 'key' | 'kind' | 'name' | 'previewUrl'>;

type Meta =
  | { add: UploadPlaceholder[] }
  | { progress: { key: string; fraction: number } }
  | { remove: string }
  /** The placeholder's content was inserted at its position in this same transaction. */
  | { place: string };

interface UploadPluginState {
  placeholders: UploadPlaceholder[];
  /** Images without alt text, marked. */
  missingAlt: DecorationSet;
}

export const uploadPluginKey = new PluginKey<UploadPluginState>('reworkbookUploads');

export const NO_ALT_TITLE = 'No alt text yet: describe this photo for readers who cannot see it';

function missingAltDecorations(doc: PmNode): DecorationSet {
  const decorations: Decoration[] = [];
  doc.descendants((node, pos) => {
    if (node.type.name === 'image' && !String(node.attrs.alt ?? '').trim()) {
      decorations.push(
        Decoration.node(pos, pos + node.nodeSize, { class: 'rich-editor__image--no-alt', title: NO_ALT_TITLE }),
      );
    }
  });
  return DecorationSet.create(doc, decorations);
}

function statusText(placeholder: UploadPlaceholder): string {
  return `Uploading “${placeholder.name}” — ${Math.round(placeholder.fraction * 100)} %`;
}

function renderPlaceholder(placeholder: UploadPlaceholder): HTMLElement {
  const root = document.createElement('span');
  root.className = `rwb-upload-placeholder rwb-upload-placeholder--${placeholder.kind}`;
  root.contentEditable = 'false';
  root.dataset.uploadKey = placeholder.key;
  if (placeholder.previewUrl) {
    const img = document.createElement('img');
    img.className = 'rwb-upload-placeholder__preview';
    img.src = placeholder.previewUrl;
    // The status next to it says what it is; the real alt text comes with the real image.
    img.alt = '';
    root.append(img);
  }
  const status = document.createElement('span');
  status.className = 'rwb-upload-placeholder__status';
  status.textContent = statusText(placeholder);
  root.append(status);
  return root;
}

function apply(tr: Transaction, state: UploadPluginState): UploadPluginState {
  const meta = tr.getMeta(uploadPluginKey) as Meta | undefined;
  let { placeholders, missingAlt } = state;
  if (tr.docChanged) {
    const placed = meta && 'place' in meta ? placeholders.find((p) => p.key === meta.place) : undefined;
    placeholders = placeholders.map((p) => {
      // Later siblings of a placed file move past what was inserted; everything else stays before
      // text typed at its position, so the writer's cursor carries on after the placeholder.
      const after = placed !== undefined && p.group === placed.group && p.index > placed.index;
      return { ...p, pos: tr.mapping.map(p.pos, after ? 1 : -1) };
    });
    missingAlt = missingAltDecorations(tr.doc);
  }
  if (meta) {
    if ('add' in meta) placeholders = [...placeholders, ...meta.add];
    else if ('progress' in meta) {
      const { key, fraction } = meta.progress;
      placeholders = placeholders.map((p) => (p.key === key ? { ...p, fraction } : p));
    } else if ('remove' in meta) placeholders = placeholders.filter((p) => p.key !== meta.remove);
    else placeholders = placeholders.filter((p) => p.key !== meta.place);
  }
  return placeholders === state.placeholders && missingAlt === state.missingAlt ? state : { placeholders, missingAlt };
}

function decorations(state: EditorState): DecorationSet {
  const pluginState = uploadPluginKey.getState(state);
  if (!pluginState) return DecorationSet.empty;
  if (pluginState.placeholders.length === 0) return pluginState.missingAlt;
  const widgets = pluginState.placeholders.map((p) =>
    // The key stays the same while the upload runs, so the preview is not redrawn on each
    // percent; the status text is updated in place by the plugin view below.
    Decoration.widget(p.pos, () => renderPlaceholder(p), {
      key: p.key,
      side: -1,
      ignoreSelection: true,
      stopEvent: () => true,
    }),
  );
  return pluginState.missingAlt.add(state.doc, widgets);
}

function updateStatuses(view: EditorView) {
  for (const p of uploadPluginKey.getState(view.state)?.placeholders ?? []) {
    // Keys are `upload-<n>`: nothing in them needs escaping in a selector.
    const status = view.dom.querySelector(`[data-upload-key="${p.key}"] .rwb-upload-placeholder__status`);
    const text = statusText(p);
    if (status && status.textContent !== text) status.textContent = text;
  }
}

function filesOf(data: DataTransfer | null | undefined): File[] {
  return data ? [...data.files] : [];
}

export interface UploadExtensionOptions {
  /** Files the writer pasted, dropped or picked, and where in the document they go. */
  onFiles: (files: File[], pos: number) => void;
}

/** Paste and drop of files into the editor, the placeholders, and the missing-alt-text marks. */
export const UploadFiles = Extension.create<UploadExtensionOptions>({
  name: 'uploadFiles',
  // Before the link extension's paste handling, which would otherwise look at the pasted text.
  priority: 1000,

  addOptions() {
    return { onFiles: () => {} };
  },

  addProseMirrorPlugins() {
    const options = this.options;
    return [
      new Plugin<UploadPluginState>({
        key: uploadPluginKey,
        state: {
          init: (_config, state) => ({ placeholders: [], missingAlt: missingAltDecorations(state.doc) }),
          apply,
        },
        props: {
          decorations,
          handlePaste(view, event) {
            const files = filesOf(event.clipboardData);
            if (files.length === 0 || !view.editable) return false;
            // A paste replaces the selection, as pasted text would.
            if (!view.state.selection.empty) view.dispatch(view.state.tr.deleteSelection());
            options.onFiles(files, view.state.selection.from);
            return true;
          },
          handleDrop(view, event, _slice, moved) {
            const files = filesOf(event.dataTransfer);
            if (moved || files.length === 0 || !view.editable) return false;
            const at = view.posAtCoords({ left: event.clientX, top: event.clientY });
            options.onFiles(files, at ? at.pos : view.state.selection.from);
            return true;
          },
        },
        view: () => ({ update: updateStatuses }),
      }),
    ];
  },
});

// --- what the upload controller does with placeholders ---------------------------------------

let nextGroup = 1;

function dispatchMeta(editor: Editor, meta: Meta) {
  editor.view.dispatch(editor.state.tr.setMeta(uploadPluginKey, meta).setMeta('addToHistory', false));
}

/**
 * Where a file added at `pos` goes. A photo is a block of its own: in a top-level paragraph it
 * splits the text there; in a heading, list, quote, table or code block it goes after that whole
 * block, because Markdown has no room for it there (a table cell is one line, a photo right under
 * a list item's text would read as part of that text, and a split heading is two headings). A
 * link fits in any text except code, so only code blocks send attachments below.
 */
export function placementOf(state: EditorState, pos: number, kind: UploadPlaceholder['kind']): number {
  const at = Math.max(0, Math.min(pos, state.doc.content.size));
  const $pos = state.doc.resolve(at);
  if ($pos.depth === 0) return at;
  const inText = $pos.parent.isTextblock && !$pos.parent.type.spec.code;
  if (kind === 'file') return inText ? at : $pos.after(1);
  return $pos.depth === 1 && $pos.parent.type.name === 'paragraph' ? at : $pos.after(1);
}

/** Shows placeholders for files added together, in this order, at `pos`. */
export function addPlaceholders(editor: Editor, files: NewPlaceholder[], pos: number) {
  const group = nextGroup++;
  dispatchMeta(editor, {
    add: files.map((file, index) => ({
      ...file,
      pos: placementOf(editor.state, pos, file.kind),
      group,
      index,
      fraction: 0,
    })),
  });
}

export function setPlaceholderProgress(editor: Editor, key: string, fraction: number) {
  const current = placeholderOf(editor.state, key);
  // One redraw per percent is plenty.
  if (!current || Math.round(current.fraction * 100) === Math.round(fraction * 100)) return;
  dispatchMeta(editor, { progress: { key, fraction } });
}

export function removePlaceholder(editor: Editor, key: string) {
  if (placeholderOf(editor.state, key)) dispatchMeta(editor, { remove: key });
}

export function placeholderOf(state: EditorState, key: string): UploadPlaceholder | null {
  return uploadPluginKey.getState(state)?.placeholders.find((p) => p.key === key) ?? null;
}

export function placeholders(state: EditorState): UploadPlaceholder[] {
  return uploadPluginKey.getState(state)?.placeholders ?? [];
}

/**
 * Puts `content` where the placeholder stands and removes the placeholder, in one transaction
 * (one undo step). The writer's selection stays where it is. False when the placeholder is gone.
 */
export function replacePlaceholder(editor: Editor, key: string, content: JSONContent | JSONContent[]): boolean {
  const placeholder = placeholderOf(editor.state, key);
  if (!placeholder) return false;
  let range = { from: placeholder.pos, to: placeholder.pos };
  const first = Array.isArray(content) ? content[0] : content;
  const $pos = editor.state.doc.resolve(placeholder.pos);
  if (first && editor.schema.nodes[first.type ?? '']?.isBlock && $pos.parent.isTextblock) {
    // A block splits the text here: the spaces at the split would start or end a paragraph,
    // which Markdown does not keep, so they go (the round trip stays exact).
    const before = $pos.parent.textBetween(0, $pos.parentOffset);
    const after = $pos.parent.textBetween($pos.parentOffset, $pos.parent.content.size);
    range = {
      from: placeholder.pos - (/[ \t]*$/.exec(before)?.[0].length ?? 0),
      to: placeholder.pos + (/^[ \t]*/.exec(after)?.[0].length ?? 0),
    };
  }
  return editor
    .chain()
    .command(({ tr }) => {
      tr.setMeta(uploadPluginKey, { place: key } satisfies Meta);
      return true;
    })
    .insertContentAt(range, content, { updateSelection: false })
    .run();
}

/**
 * An uploaded attachment as a link at `pos`, with a space on either side where the text around
 * would otherwise run into it.
 */
export function attachmentLink(state: EditorState, pos: number, name: string, href: string): JSONContent[] {
  const $pos = state.doc.resolve(pos);
  const inText = $pos.parent.isTextblock;
  const before = inText ? $pos.parent.textBetween(0, $pos.parentOffset) : '';
  const after = inText ? $pos.parent.textBetween($pos.parentOffset, $pos.parent.content.size) : '';
  const link: JSONContent = { type: 'text', text: name, marks: [{ type: 'link', attrs: { href } }] };
  const out: JSONContent[] = [];
  if (before && !/\s$/.test(before)) out.push({ type: 'text', text: ' ' });
  out.push(link);
  if (after && !/^\s/.test(after)) out.push({ type: 'text', text: ' ' });
  return inText ? out : [{ type: 'paragraph', content: out }];
}

/**
 * Sets alt text and caption on the images showing `src` that have no alt text yet (an upload may
 * be used twice; a description the writer gave one of them is left alone).
 */
export function describeImages(editor: Editor, src: string, values: { alt: string; title: string }): boolean {
  const { tr } = editor.state;
  editor.state.doc.descendants((node, pos) => {
    if (node.type.name === 'image' && node.attrs.src === src && !String(node.attrs.alt ?? '').trim()) {
      tr.setNodeMarkup(pos, undefined, { ...node.attrs, alt: values.alt, title: values.title || null });
    }
  });
  if (!tr.docChanged) return false;
  editor.view.dispatch(tr);
  return true;
}

export interface ImageWithoutAlt {
  src: string;
  /** The upload behind it, when it is one of the project's own (`/api/uploads/:id/…`). */
  uploadId: number | null;
  title: string;
}

/** The images in the document that have no alt text, once per address. */
export function imagesWithoutAlt(doc: PmNode): ImageWithoutAlt[] {
  const seen = new Map<string, ImageWithoutAlt>();
  doc.descendants((node) => {
    if (node.type.name !== 'image' || String(node.attrs.alt ?? '').trim()) return;
    const src = String(node.attrs.src ?? '');
    if (!src || seen.has(src)) return;
    const id = /^\/api\/uploads\/(\d+)\//.exec(src)?.[1];
    seen.set(src, { src, uploadId: id ? Number(id) : null, title: String(node.attrs.title ?? '') });
  });
  return [...seen.values()];
}
