/**
 * Drafts in the browser: a safety net for unsaved writing. While someone edits, what they have
 * is copied to localStorage shortly after each change; when the page opens again after a crash,
 * a closed tab or a lost connection, the copy is offered back ("An unsaved draft from … was
 * found — Restore / Discard").
 *
 * Storage is best effort. When localStorage is missing, blocked or full, drafts quietly stop
 * (`storageWorks` turns false so a page may say so); the editor content itself is never touched
 * by anything here.
 */
import { z } from 'zod';
import { getCurrentInstance, onBeforeUnmount, readonly, ref, shallowRef, watch } from 'vue';

export interface Draft {
  /** The edited fields, e.g. `{ title, body }`. */
  content: Record<string, string>;
  /** The revision the writer started from; a save of a restored draft must send this one. */
  baseRevision: number;
  /** When the draft was written (ISO 8601). */
  savedAt: string;
}

const draftSchema = z.object({
  content: z.record(z.string(), z.string()),
  baseRevision: z.number().int().min(0),
  savedAt: z.iso.datetime({ offset: true }),
});

const PREFIX = 'rwb.draft';

/** The storage key of a document's draft: `rwb.draft.<project>.<document>`. */
export function draftKey(projectSlug: string, documentId: number | string): string {
  return `${PREFIX}.${projectSlug}.${documentId}`;
}

export interface UseDraftOptions {
  /** What the editor holds now. Watched: every change schedules a write. */
  content: () => Record<string, string>;
  /**
   * The content as stored on the server (as loaded, or as last saved) and its revision. A draft
   * equal to it is no draft; `null` while the document is still loading.
   */
  saved: () => { content: Record<string, string>; revision: number } | null;
  /** Wait after the last change before writing; 500 ms unless said. */
  debounceMs?: number;
  /** Where drafts live; `window.localStorage` unless said (tests pass their own). */
  storage?: () => Storage | null;
  /** The clock, for tests. */
  now?: () => Date;
}

function sameContent(a: Record<string, string>, b: Record<string, string>): boolean {
  const keys = new Set([...Object.keys(a), ...Object.keys(b)]);
  for (const key of keys) if ((a[key] ?? '') !== (b[key] ?? '')) return false;
  return true;
}

function defaultStorage(): Storage | null {
  try {
    return typeof window === 'undefined' ? null : window.localStorage;
  } catch {
    // Reading `localStorage` itself throws where the browser blocks site data.
    return null;
  }
}

export function useDraft(key: () => string, options: UseDraftOptions) {
  const delay = options.debounceMs ?? 500;
  const storageOf = options.storage ?? defaultStorage;
  const now = options.now ?? (() => new Date());

  /** The draft found when the document opened, while the writer has not restored or discarded it. */
  const draft = shallowRef<Draft | null>(null);
  const storageWorks = ref(true);

  let timer: ReturnType<typeof setTimeout> | undefined;
  /** The key the pending write belongs to, so a write never lands under another document. */
  let pendingKey: string | null = null;
  /** Set once the opening check ran for the current key; nothing is written before it. */
  let checkedKey: string | null = null;

  function read(storageKey: string): Draft | null {
    let raw: string | null;
    try {
      raw = storageOf()?.getItem(storageKey) ?? null;
    } catch {
      storageWorks.value = false;
      return null;
    }
    if (raw === null) return null;
    try {
      const parsed = draftSchema.safeParse(JSON.parse(raw));
      if (parsed.success) return parsed.data;
    } catch {
      // Not JSON: fall through and drop it.
    }
    remove(storageKey);
    return null;
  }

  function remove(storageKey: string) {
    try {
      storageOf()?.removeItem(storageKey);
    } catch {
      storageWorks.value = false;
    }
  }

  function write(storageKey: string) {
    const saved = options.saved();
    if (!saved) return;
    const content = { ...options.content() };
    if (sameContent(content, saved.content)) {
      // Back to what is stored: nothing to keep, unless an offered draft still waits there.
      if (!draft.value) remove(storageKey);
      return;
    }
    const record: Draft = { content, baseRevision: saved.revision, savedAt: now().toISOString() };
    const storage = storageOf();
    if (!storage) {
      storageWorks.value = false;
      return;
    }
    try {
      storage.setItem(storageKey, JSON.stringify(record));
      storageWorks.value = true;
    } catch {
      // Full (QuotaExceededError) or blocked: the editor still has everything.
      storageWorks.value = false;
    }
  }

  function cancelPending() {
    clearTimeout(timer);
    timer = undefined;
    pendingKey = null;
  }

  /** Writes a scheduled draft at once (before the page goes away). */
  function flush() {
    if (pendingKey === null) return;
    const storageKey = pendingKey;
    cancelPending();
    write(storageKey);
  }

  function schedule() {
    const storageKey = key();
    if (checkedKey !== storageKey) return;
    if (pendingKey !== null && pendingKey !== storageKey) flush();
    clearTimeout(timer);
    pendingKey = storageKey;
    timer = setTimeout(flush, delay);
  }

  /** Looks for a draft of the current document once its stored content is known. */
  function check() {
    const storageKey = key();
    const saved = options.saved();
    if (!saved || checkedKey === storageKey) return;
    checkedKey = storageKey;
    const found = read(storageKey);
    if (found && !sameContent(found.content, saved.content)) {
      draft.value = found;
    } else {
      draft.value = null;
      if (found) remove(storageKey);
    }
  }

  /**
   * Hands back the offered draft for the page to put into its fields, and stops offering it.
   * Save it with `baseRevision` from the draft, so changes saved since are merged, not overwritten.
   */
  function restore(): Draft | null {
    const found = draft.value;
    draft.value = null;
    return found;
  }

  /** Throws the offered draft away (unless newer typing has already replaced it in storage). */
  function discard() {
    const found = draft.value;
    draft.value = null;
    if (!found) return;
    const stored = read(key());
    if (stored && stored.savedAt === found.savedAt) remove(key());
  }

  /** After a successful save: the server has it all, so no draft is kept or offered. */
  function clear() {
    cancelPending();
    draft.value = null;
    remove(key());
  }

  watch(key, (next, previous) => {
    if (pendingKey === previous) flush();
    draft.value = null;
    checkedKey = null;
    if (next) check();
  });
  watch(() => options.saved() !== null, check, { immediate: true });
  watch(options.content, schedule, { deep: true });

  const onPageHide = () => flush();
  if (typeof window !== 'undefined') window.addEventListener('pagehide', onPageHide);
  const stop = () => {
    flush();
    if (typeof window !== 'undefined') window.removeEventListener('pagehide', onPageHide);
  };
  if (getCurrentInstance()) onBeforeUnmount(stop);

  return {
    draft: readonly(draft),
    storageWorks: readonly(storageWorks),
    restore,
    discard,
    clear,
    flush,
    /** Stops listening and writes what is pending; called by itself when the component unmounts. */
    stop,
  };
}
