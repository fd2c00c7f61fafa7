/**
 * What the rich editor does with files: each one gets a placeholder at its place in the text and
 * an entry in the upload queue; each photo gets an alt-text prompt (one at a time); when the
 * server has the file ready the placeholder becomes the image (or a link to the attachment), with
 * the description the writer gave. A failed or cancelled upload takes its placeholder with it.
 *
 * The writer may answer the prompt before or after the upload is ready: the description is put on
 * the image either way, and saved on the upload too (the gallery and the publish check read it).
 */
import type { Upload } from '@shared/contracts/uploads';
import type { Editor } from '@tiptap/core';
import { computed, getCurrentScope, onScopeDispose, ref, shallowRef, watch, type ShallowRef } from 'vue';
import {
  addPlaceholders,
  attachmentLink,
  describeImages,
  imagesWithoutAlt,
  placeholderOf,
  removePlaceholder,
  replacePlaceholder,
  setPlaceholderProgress,
  type ImageWithoutAlt,
} from '@/components/editor/upload-extension';
import { reportUnexpected } from '@/composables/notifier';
import { uploadsApi, useUploadQueue, type QueuedUpload } from '@/composables/uploads';

export interface ImageDescription {
  altText: string;
  caption: string;
}

export interface AltTextPrompt {
  /** The queue key of a new upload, or `image:<src>` for an image already in the text. */
  id: string;
  name: string;
  previewUrl: string;
  altText: string;
  caption: string;
  /** Set for an image already in the text (not a new upload). */
  existing?: ImageWithoutAlt;
}

interface Entry {
  previewUrl: string | null;
  answer: ImageDescription | null;
  upload: Upload | null;
  /** The prompt for it is still waiting or open. */
  prompting: boolean;
  /** The upload ended, placed or not. */
  finished: boolean;
  placed: boolean;
}

export interface EditorUploadsOptions {
  editor: ShallowRef<Editor | undefined>;
  /** The project the files go to; read when a file is added. */
  slug: () => string | undefined;
  /** Off: nothing is tracked (the editor has no uploads). */
  enabled: boolean;
}

export function useEditorUploads({ editor, slug, enabled }: EditorUploadsOptions) {
  const queue = useUploadQueue();
  const prompts = ref<AltTextPrompt[]>([]);
  const entries = new Map<string, Entry>();
  const missingAlt = shallowRef<ImageWithoutAlt[]>([]);

  if (enabled) {
    watch(
      editor,
      (current, _old, onCleanup) => {
        if (!current) return;
        const refresh = () => {
          missingAlt.value = imagesWithoutAlt(current.state.doc);
        };
        const onTransaction = ({ transaction }: { transaction: { docChanged: boolean } }) => {
          if (transaction.docChanged) refresh();
        };
        refresh();
        current.on('transaction', onTransaction);
        onCleanup(() => current.off('transaction', onTransaction));
      },
      { immediate: true },
    );
  }

  /** Frees the local preview once neither the placeholder nor the prompt shows it. */
  function release(key: string) {
    const entry = entries.get(key);
    if (!entry || entry.prompting || !entry.finished) return;
    if (entry.previewUrl) URL.revokeObjectURL(entry.previewUrl);
    entries.delete(key);
  }

  function saveDescription(uploadId: number, values: ImageDescription) {
    uploadsApi.update(uploadId, { altText: values.altText, caption: values.caption }).catch(reportUnexpected);
  }

  function place(item: QueuedUpload, upload: Upload) {
    const entry = entries.get(item.key);
    const current = editor.value;
    if (!entry || !current) return;
    entry.upload = upload;
    const placeholder = placeholderOf(current.state, item.key);
    if (placeholder) {
      const content =
        upload.kind === 'image'
          ? {
              type: 'image',
              attrs: { src: upload.markdownUrl, alt: entry.answer?.altText ?? '', title: entry.answer?.caption || null },
            }
          : attachmentLink(current.state, placeholder.pos, upload.name, upload.markdownUrl);
      entry.placed = replacePlaceholder(current, item.key, content);
    }
    if (entry.answer) saveDescription(upload.id, entry.answer);
  }

  async function follow(item: QueuedUpload) {
    try {
      place(item, await item.done);
    } catch {
      // The queue entry says why (or the writer cancelled it); the placeholder and prompt go.
      if (editor.value) removePlaceholder(editor.value, item.key);
      prompts.value = prompts.value.filter((p) => p.id !== item.key);
      const entry = entries.get(item.key);
      if (entry) entry.prompting = false;
    } finally {
      const entry = entries.get(item.key);
      if (entry) entry.finished = true;
      release(item.key);
    }
  }

  /** Uploads files into the text at `pos` (the cursor when not given), in this order. */
  function addFiles(files: File[], pos?: number) {
    const current = editor.value;
    const project = slug();
    if (!enabled || !current || !project || files.length === 0) return;
    const at = pos ?? current.state.selection.to;
    const added = files.map((file) => {
      const item = queue.add(project, file, {
        onProgress: (fraction) => {
          if (editor.value) setPlaceholderProgress(editor.value, item.key, fraction);
        },
      });
      const previewUrl = item.isImage ? URL.createObjectURL(file) : null;
      entries.set(item.key, { previewUrl, answer: null, upload: null, prompting: item.isImage, finished: false, placed: false });
      return { item, previewUrl };
    });
    addPlaceholders(
      current,
      added.map(({ item, previewUrl }) => ({
        key: item.key,
        kind: item.isImage ? 'image' : 'file',
        name: item.name,
        previewUrl,
      })),
      at,
    );
    prompts.value = [
      ...prompts.value,
      ...added
        .filter(({ previewUrl }) => previewUrl !== null)
        .map(({ item, previewUrl }) => ({ id: item.key, name: item.name, previewUrl: previewUrl!, altText: '', caption: '' })),
    ];
    for (const { item } of added) void follow(item);
  }

  function closePrompt(id: string) {
    prompts.value = prompts.value.filter((p) => p.id !== id);
    if (prompts.value.length === 0) editor.value?.commands.focus();
  }

  /** The writer described the photo of the prompt `id`. */
  function answer(id: string, values: ImageDescription) {
    const prompt = prompts.value.find((p) => p.id === id);
    if (!prompt) return;
    closePrompt(id);
    const current = editor.value;
    if (prompt.existing) {
      if (current) describeImages(current, prompt.existing.src, { alt: values.altText, title: values.caption });
      if (prompt.existing.uploadId) saveDescription(prompt.existing.uploadId, values);
      return;
    }
    const entry = entries.get(id);
    if (!entry) return;
    entry.answer = values;
    entry.prompting = false;
    if (entry.upload) {
      if (entry.placed && current) describeImages(current, entry.upload.markdownUrl, { alt: values.altText, title: values.caption });
      saveDescription(entry.upload.id, values);
    }
    release(id);
  }

  /** The writer skipped the description: the image comes without alt text, and stays marked. */
  function skip(id: string) {
    closePrompt(id);
    const entry = entries.get(id);
    if (!entry) return;
    entry.prompting = false;
    release(id);
  }

  /** Asks for the description of an image already in the text. */
  function describe(image: ImageWithoutAlt) {
    const id = `image:${image.src}`;
    if (prompts.value.some((p) => p.id === id)) return;
    prompts.value = [
      ...prompts.value,
      {
        id,
        name: image.title || image.src.split('/').pop() || 'photo',
        previewUrl: image.src,
        altText: '',
        caption: image.title,
        existing: image,
      },
    ];
  }

  if (getCurrentScope()) {
    onScopeDispose(() => {
      for (const entry of entries.values()) if (entry.previewUrl) URL.revokeObjectURL(entry.previewUrl);
      entries.clear();
    });
  }

  return {
    queue,
    /** The prompt shown now, and how many wait behind it. */
    prompt: computed(() => prompts.value[0] ?? null),
    waitingPrompts: computed(() => Math.max(0, prompts.value.length - 1)),
    missingAlt,
    addFiles,
    answer,
    skip,
    describe,
    cancel: (key: string) => queue.dismiss(key),
  };
}
