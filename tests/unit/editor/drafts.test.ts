// @vitest-environment happy-dom
/**
 * Drafts in the browser (app/composables/drafts.ts): written shortly after changes, offered back
 * when the document opens again, gone after a save, and never a problem when storage fails.
 */
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { nextTick, ref, type Ref } from 'vue';
import { draftKey, useDraft } from '@/composables/drafts';

type Content = Record<string, string>;

const KEY = draftKey('tide-clock', 12);

interface Harness {
  content: Ref<Content>;
  saved: Ref<{ content: Content; revision: number } | null>;
  key: Ref<string>;
  draft: ReturnType<typeof useDraft>;
}

const open: Harness[] = [];

function start(options: { saved?: Content | null; revision?: number; storage?: () => Storage | null } = {}): Harness {
  const savedContent = options.saved === undefined ? { title: 'Gear train', body: 'First cut.' } : options.saved;
  const content = ref<Content>({ ...(savedContent ?? {}) });
  const saved = ref(savedContent ? { content: { ...savedContent }, revision: options.revision ?? 3 } : null);
  const key = ref(KEY);
  const draft = useDraft(() => key.value, {
    content: () => content.value,
    saved: () => saved.value,
    now: () => new Date(),
    ...(options.storage ? { storage: options.storage } : {}),
  });
  const harness = { content, saved, key, draft };
  open.push(harness);
  return harness;
}

function stored(key = KEY) {
  const raw = localStorage.getItem(key);
  return raw === null ? null : (JSON.parse(raw) as { content: Content; baseRevision: number; savedAt: string });
}

beforeEach(() => {
  vi.useFakeTimers();
  vi.setSystemTime(new Date('2026-03-14T09:30:00.000Z'));
  localStorage.clear();
});

afterEach(() => {
  while (open.length) open.pop()!.draft.stop();
  vi.useRealTimers();
});

describe('useDraft', () => {
  it('uses keys of the form rwb.draft.<project>.<document>', () => {
    expect(draftKey('tide-clock', 12)).toBe('rwb.draft.tide-clock.12');
  });

  it('writes the content about half a second after the last change, with the base revision', async () => {
    const { content } = start({ revision: 3 });
    content.value = { title: 'Gear train', body: 'First cut. The idler gear slips.' };
    await nextTick();
    vi.advanceTimersByTime(300);
    content.value = { title: 'Gear train', body: 'First cut. The idler gear slips at 2 rpm.' };
    await nextTick();
    vi.advanceTimersByTime(400);
    expect(stored()).toBeNull();
    vi.advanceTimersByTime(200);
    expect(stored()).toEqual({
      content: { title: 'Gear train', body: 'First cut. The idler gear slips at 2 rpm.' },
      baseRevision: 3,
      savedAt: '2026-03-14T09:30:00.800Z', // 300 ms + 500 ms after the last change
    });
  });

  it('offers a stored draft that differs from the server content when the document opens', () => {
    localStorage.setItem(
      KEY,
      JSON.stringify({
        content: { title: 'Gear train', body: 'Lost in a crash' },
        baseRevision: 2,
        savedAt: '2026-03-13T20:00:00.000Z',
      }),
    );
    const { draft } = start({ revision: 3 });
    expect(draft.draft.value).toEqual({
      content: { title: 'Gear train', body: 'Lost in a crash' },
      baseRevision: 2,
      savedAt: '2026-03-13T20:00:00.000Z',
    });
    expect(draft.restore()).toEqual({
      content: { title: 'Gear train', body: 'Lost in a crash' },
      baseRevision: 2,
      savedAt: '2026-03-13T20:00:00.000Z',
    });
    expect(draft.draft.value).toBeNull();
  });

  it('waits for the server content before looking for a draft', async () => {
    localStorage.setItem(
      KEY,
      JSON.stringify({
        content: { title: 'T', body: 'draft text' },
        baseRevision: 1,
        savedAt: '2026-03-13T20:00:00.000Z',
      }),
    );
    const { saved, draft, content } = start({ saved: null });
    expect(draft.draft.value).toBeNull();
    content.value = { title: 'T', body: '' };
    saved.value = { content: { title: 'T', body: '' }, revision: 1 };
    await nextTick();
    expect(draft.draft.value?.content.body).toBe('draft text');
  });

  it('drops a stored draft that equals the server content instead of offering it', () => {
    localStorage.setItem(
      KEY,
      JSON.stringify({
        content: { title: 'Gear train', body: 'First cut.' },
        baseRevision: 3,
        savedAt: '2026-03-13T20:00:00.000Z',
      }),
    );
    const { draft } = start();
    expect(draft.draft.value).toBeNull();
    expect(stored()).toBeNull();
  });

  it('ignores and removes a stored value that is not a draft', () => {
    localStorage.setItem(KEY, '{"content": 5}');
    const { draft } = start();
    expect(draft.draft.value).toBeNull();
    expect(stored()).toBeNull();
    localStorage.setItem(KEY, 'not json');
    const again = start();
    expect(again.draft.draft.value).toBeNull();
  });

  it('discard throws the offered draft away', () => {
    localStorage.setItem(
      KEY,
      JSON.stringify({
        content: { title: 'Gear train', body: 'old' },
        baseRevision: 2,
        savedAt: '2026-03-13T20:00:00.000Z',
      }),
    );
    const { draft } = start();
    draft.discard();
    expect(draft.draft.value).toBeNull();
    expect(stored()).toBeNull();
  });

  it('clear after a save removes the draft and cancels a pending write', async () => {
    const { content, saved, draft } = start();
    content.value = { title: 'Gear train', body: 'Saved text' };
    await nextTick();
    vi.advanceTimersByTime(600);
    expect(stored()).not.toBeNull();
    content.value = { title: 'Gear train', body: 'Saved text, more' };
    await nextTick();
    draft.clear();
    saved.value = { content: { title: 'Gear train', body: 'Saved text, more' }, revision: 4 };
    vi.advanceTimersByTime(1000);
    expect(stored()).toBeNull();
  });

  it('removes the draft when the writer undoes back to the stored content', async () => {
    const { content } = start();
    content.value = { title: 'Gear train', body: 'Typo' };
    await nextTick();
    vi.advanceTimersByTime(600);
    expect(stored()).not.toBeNull();
    content.value = { title: 'Gear train', body: 'First cut.' };
    await nextTick();
    vi.advanceTimersByTime(600);
    expect(stored()).toBeNull();
  });

  it('writes what is pending when the page is hidden (tab closed)', async () => {
    const { content } = start();
    content.value = { title: 'Gear train', body: 'Last words' };
    await nextTick();
    window.dispatchEvent(new Event('pagehide'));
    expect(stored()?.content.body).toBe('Last words');
  });

  it('writes a pending change under the old key when the writer moves to another document', async () => {
    const { content, key } = start();
    content.value = { title: 'Gear train', body: 'For document 12' };
    await nextTick();
    key.value = draftKey('tide-clock', 13);
    await nextTick();
    expect(stored()?.content.body).toBe('For document 12');
    expect(stored(draftKey('tide-clock', 13))).toBeNull();
  });

  it('goes on quietly when storage is full, leaving the content alone', async () => {
    const full = {
      getItem: () => null,
      setItem: () => {
        throw new DOMException('The quota has been exceeded.', 'QuotaExceededError');
      },
      removeItem: () => {},
    } as unknown as Storage;
    const { content, draft } = start({ storage: () => full });
    content.value = { title: 'Gear train', body: 'Still here' };
    await nextTick();
    expect(() => vi.advanceTimersByTime(600)).not.toThrow();
    expect(draft.storageWorks.value).toBe(false);
    expect(content.value.body).toBe('Still here');
  });

  it('goes on quietly when there is no storage at all', async () => {
    const { content, draft } = start({ storage: () => null });
    content.value = { title: 'Gear train', body: 'No storage' };
    await nextTick();
    vi.advanceTimersByTime(600);
    expect(draft.storageWorks.value).toBe(false);
    expect(draft.draft.value).toBeNull();
  });

  it('keeps offering a found draft while newer typing is saved over it', async () => {
    localStorage.setItem(
      KEY,
      JSON.stringify({
        content: { title: 'Gear train', body: 'From the crash' },
        baseRevision: 2,
        savedAt: '2026-03-13T20:00:00.000Z',
      }),
    );
    const { content, draft } = start();
    content.value = { title: 'Gear train', body: 'Typed since opening' };
    await nextTick();
    vi.advanceTimersByTime(600);
    expect(draft.draft.value?.content.body).toBe('From the crash');
    expect(stored()?.content.body).toBe('Typed since opening');
    // Discarding the old draft leaves the newer one in storage.
    draft.discard();
    expect(stored()?.content.body).toBe('Typed since opening');
  });
});
