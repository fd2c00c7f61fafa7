/**
 * Tag suggestions while someone types a tag: approved tags plus the member's own pending ones.
 * A name the server does not know becomes a new pending tag when the lesson or erratum is saved.
 */
import type { TagRef, tagSuggestionsSchema } from '@shared/contracts/errata';
import { getCurrentInstance, onBeforeUnmount, ref, shallowRef } from 'vue';
import type { z } from 'zod';
import { http } from './http';
import { reportUnexpected } from './notifier';

export type TagSuggestions = z.infer<typeof tagSuggestionsSchema>;

export const tagsApi = {
  suggest: (q: string, signal?: AbortSignal) =>
    http.get<TagSuggestions>('/tags/suggest', { query: { q }, ...(signal ? { signal } : {}) }),
};

/** Tag names compare without case and surrounding space, as the server matches them. */
export function sameTag(a: string, b: string): boolean {
  return a.trim().toLowerCase() === b.trim().toLowerCase();
}

/**
 * What a chip for `name` should say: the known tag when `known` has it (by name or slug),
 * otherwise a new tag, which the server creates as pending.
 */
export function tagStateOf(name: string, known: readonly TagRef[]): TagRef {
  const found = known.find((tag) => sameTag(tag.name, name) || sameTag(tag.slug, name));
  return found ?? { slug: '', name: name.trim(), state: 'pending' };
}

/**
 * Suggestions for what is being typed, fetched a moment after the last key and cancelled when
 * overtaken, so a slow answer never replaces a newer one. Every tag seen is remembered in `known`,
 * which lets chips tell approved from pending tags.
 */
export function useTagSuggestions(options: { debounceMs?: number; initial?: readonly TagRef[] } = {}) {
  const delay = options.debounceMs ?? 200;
  const items = shallowRef<TagRef[]>([]);
  const known = shallowRef<TagRef[]>([...(options.initial ?? [])]);
  const loading = ref(false);
  let timer: ReturnType<typeof setTimeout> | undefined;
  let controller: AbortController | null = null;

  function remember(tags: readonly TagRef[]) {
    const next = [...known.value];
    for (const tag of tags) {
      const index = next.findIndex((t) => t.slug === tag.slug && tag.slug !== '');
      if (index >= 0) next[index] = tag;
      else next.push(tag);
    }
    known.value = next;
  }

  async function fetchNow(q: string) {
    controller?.abort();
    const mine = new AbortController();
    controller = mine;
    loading.value = true;
    try {
      const answer = await tagsApi.suggest(q.trim(), mine.signal);
      if (controller !== mine) return;
      items.value = answer.items;
      remember(answer.items);
    } catch (error) {
      if ((error as Error)?.name !== 'AbortError') reportUnexpected(error);
    } finally {
      if (controller === mine) {
        loading.value = false;
        controller = null;
      }
    }
  }

  function search(q: string | null | undefined) {
    clearTimeout(timer);
    timer = setTimeout(() => void fetchNow(q ?? ''), delay);
  }

  if (getCurrentInstance()) {
    onBeforeUnmount(() => {
      clearTimeout(timer);
      controller?.abort();
    });
  }

  return { items, known, loading, search, remember };
}
