// @vitest-environment happy-dom
import { mount } from '@vue/test-utils';
import type { RevisionDetail, RevisionSummary } from '@shared/contracts/projects';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { defineComponent, h, nextTick, ref } from 'vue';
import { createMemoryHistory, createRouter } from 'vue-router';
import { ApiError } from '@/composables/http';
import {
  comparisonFromQuery,
  defaultComparison,
  originLabel,
  relativeTime,
  shortHash,
  useDocumentHistory,
  useHistoryComparison,
  useProjectHistory,
  useRestoreAction,
  type HistoryComparison,
} from '@/composables/revisions';
import { useNotifierStore } from '@/stores/notifier';

const maker = { id: 1, handle: 'odile-fenn', displayName: 'Odile Fenn', avatarUrl: null };

function summary(number: number, over: Partial<RevisionSummary> = {}): RevisionSummary {
  return {
    number,
    parentNumber: number > 1 ? number - 1 : null,
    author: maker,
    creditedTo: null,
    message: '',
    contentHash: 'ab'.repeat(32),
    origin: 'edit',
    createdAt: '2026-03-01T10:00:00.000Z',
    ...over,
  };
}

function detail(number: number, body: string): RevisionDetail {
  return { ...summary(number), title: 'Power', body, fields: null };
}

interface Call {
  method: string;
  url: string;
  body: unknown;
}

/** A fake server: answers by "METHOD /path" and records every request. */
function fakeServer(answers: Record<string, (call: Call) => { status: number; body: unknown }>) {
  const calls: Call[] = [];
  const fetchMock = vi.fn(async (url: string, init: RequestInit) => {
    const call = { method: init.method ?? 'GET', url, body: init.body ? JSON.parse(String(init.body)) : undefined };
    calls.push(call);
    const answer = answers[`${call.method} ${url}`];
    const { status, body } = answer
      ? answer(call)
      : { status: 404, body: { error: { code: 'not_found', message: 'Not here' } } };
    return new Response(JSON.stringify(body), { status, headers: { 'Content-Type': 'application/json' } });
  });
  vi.stubGlobal('fetch', fetchMock);
  return calls;
}

const ok = (body: unknown) => () => ({ status: 200, body });

beforeEach(() => setActivePinia(createPinia()));
afterEach(() => vi.unstubAllGlobals());

describe('useDocumentHistory', () => {
  const base = '/api/projects/kelpie-supply/documents/7';

  it('loads the document and its revisions together', async () => {
    const list = [summary(2), summary(1, { origin: 'create' })];
    const calls = fakeServer({
      [`GET ${base}`]: ok({ id: 7, title: 'Power', revision: 2 }),
      [`GET ${base}/revisions`]: ok({ items: list }),
    });
    const history = useDocumentHistory('kelpie-supply', 7);
    const loading = history.load();
    expect(history.loading.value).toBe(true);
    await loading;
    expect(history.loading.value).toBe(false);
    expect(history.revisions.value.map((r) => r.number)).toEqual([2, 1]);
    expect(history.document.value?.revision).toBe(2);
    expect(calls.map((c) => c.url).sort()).toEqual([base, `${base}/revisions`]);
  });

  it('fetches a revision once and answers later requests from the cache', async () => {
    const calls = fakeServer({ [`GET ${base}/revisions/1`]: ok(detail(1, 'First text')) });
    const history = useDocumentHistory('kelpie-supply', 7);
    const [a, b] = await Promise.all([history.fetchRevision(1), history.fetchRevision(1)]);
    const c = await history.fetchRevision(1);
    expect([a.body, b.body, c.body]).toEqual(['First text', 'First text', 'First text']);
    expect(calls).toHaveLength(1);
  });

  it('asks again after a failed fetch instead of caching the failure', async () => {
    let failures = 1;
    const calls = fakeServer({
      [`GET ${base}/revisions/3`]: () =>
        failures-- > 0
          ? { status: 503, body: { error: { code: 'service_unavailable', message: 'Try again' } } }
          : { status: 200, body: detail(3, 'Third text') },
    });
    const history = useDocumentHistory('kelpie-supply', 7);
    await expect(history.fetchRevision(3)).rejects.toBeInstanceOf(ApiError);
    expect((await history.fetchRevision(3)).body).toBe('Third text');
    expect(calls).toHaveLength(2);
  });

  it('restores by posting the number and the base revision, then reloads the list', async () => {
    let items = [summary(2), summary(1)];
    const calls = fakeServer({
      [`POST ${base}/restore`]: () => {
        items = [summary(3, { origin: 'restore' }), ...items];
        return { status: 200, body: { outcome: 'saved', mergedWith: null, document: { id: 7, revision: 3 } } };
      },
      [`GET ${base}`]: ok({ id: 7, revision: 3 }),
      [`GET ${base}/revisions`]: () => ({ status: 200, body: { items } }),
    });
    const history = useDocumentHistory('kelpie-supply', 7);
    const result = await history.restore(1, 2, ' Back to the first draft ');
    expect(result.outcome).toBe('saved');
    expect(calls[0]).toEqual({
      method: 'POST',
      url: `${base}/restore`,
      body: { number: 1, baseRevision: 2, message: 'Back to the first draft' },
    });
    expect(history.revisions.value.map((r) => r.number)).toEqual([3, 2, 1]);
    expect(history.document.value?.revision).toBe(3);
  });

  it('encodes the slug into the path', async () => {
    const calls = fakeServer({});
    await useDocumentHistory('a/b', 1)
      .fetchRevision(2)
      .catch(() => undefined);
    expect(calls[0]!.url).toBe('/api/projects/a%2Fb/documents/1/revisions/2');
  });
});

describe('useProjectHistory', () => {
  it('reads and restores metadata revisions at the project paths', async () => {
    const calls = fakeServer({
      ['GET /api/projects/kelpie-supply/revisions/2']: ok({
        ...detail(2, ''),
        body: null,
        fields: { title: 'Kelpie' },
      }),
      ['POST /api/projects/kelpie-supply/restore']: ok({
        outcome: 'saved',
        mergedWith: null,
        project: { revision: 4 },
      }),
      ['GET /api/projects/kelpie-supply']: ok({ revision: 4 }),
      ['GET /api/projects/kelpie-supply/revisions']: ok({ items: [summary(4)] }),
    });
    const history = useProjectHistory('kelpie-supply');
    expect((await history.fetchRevision(2)).fields).toEqual({ title: 'Kelpie' });
    await history.restore(2, 3);
    expect(calls[1]).toEqual({
      method: 'POST',
      url: '/api/projects/kelpie-supply/restore',
      body: { number: 2, baseRevision: 3, message: '' },
    });
    expect(history.project.value?.revision).toBe(4);
  });
});

describe('comparisonFromQuery', () => {
  const list = [
    summary(6, { parentNumber: 4 }),
    summary(5),
    summary(4),
    summary(3),
    summary(2),
    summary(1, { origin: 'create' }),
  ];

  it('compares the newest revision with its parent by default, inline with word marks', () => {
    expect(comparisonFromQuery({}, list)).toEqual({ from: 4, to: 6, layout: 'inline', words: true });
  });

  it('reads a shared comparison', () => {
    expect(comparisonFromQuery({ from: '2', to: '5', view: 'side', words: '0' }, list)).toEqual({
      from: 2,
      to: 5,
      layout: 'side-by-side',
      words: false,
    });
  });

  it('compares a lone "to" with the revision it was saved on', () => {
    expect(comparisonFromQuery({ to: '3' }, list)).toMatchObject({ from: 2, to: 3 });
    expect(comparisonFromQuery({ to: '1' }, list)).toMatchObject({ from: null, to: 1 });
  });

  it('falls back to the default for revisions that are not listed or not numbers', () => {
    expect(comparisonFromQuery({ from: '99', to: 'x' }, list)).toMatchObject({ from: 4, to: 6 });
  });

  it('compares a single revision against nothing', () => {
    expect(defaultComparison([summary(1, { origin: 'create' })])).toEqual({ from: null, to: 1 });
    expect(defaultComparison([])).toEqual({ from: null, to: null });
  });
});

describe('useHistoryComparison', () => {
  async function setup(query: Record<string, string>) {
    const router = createRouter({
      history: createMemoryHistory(),
      routes: [{ path: '/history', component: { render: () => null } }],
    });
    await router.push({ path: '/history', query });
    const fetched: number[] = [];
    const texts: Record<number, string> = { 1: 'one', 2: 'two', 3: 'three' };
    let comparison!: HistoryComparison;
    const Harness = defineComponent({
      setup() {
        comparison = useHistoryComparison(ref([summary(3), summary(2), summary(1)]), async (n) => {
          fetched.push(n);
          return detail(n, texts[n]!);
        });
        return () => h('div');
      },
    });
    mount(Harness, { global: { plugins: [router] } });
    await vi.waitFor(() => expect(comparison.comparing.value).toBe(false));
    return { router, comparison, fetched };
  }

  it('fetches the two revisions the URL names', async () => {
    const { comparison, fetched } = await setup({ from: '1', to: '3' });
    expect(fetched.sort()).toEqual([1, 3]);
    expect(comparison.fromRevision.value?.body).toBe('one');
    expect(comparison.toRevision.value?.body).toBe('three');
  });

  it('keeps both picks made in quick succession', async () => {
    const { router, comparison } = await setup({});
    comparison.pick('from', 1);
    comparison.pick('to', 2);
    await vi.waitFor(() => expect(router.currentRoute.value.query).toEqual({ from: '1', to: '2' }));
  });

  it('writes picks and view settings into the URL, keeping both ends', async () => {
    const { router, comparison } = await setup({});
    comparison.pick('from', 1);
    await vi.waitFor(() => expect(router.currentRoute.value.query).toEqual({ from: '1', to: '3' }));
    comparison.setLayout('side-by-side');
    comparison.setWords(false);
    await vi.waitFor(() =>
      expect(router.currentRoute.value.query).toEqual({ from: '1', to: '3', view: 'side', words: '0' }),
    );
    await vi.waitFor(() => expect(comparison.fromRevision.value?.body).toBe('one'));
    comparison.reset();
    await vi.waitFor(() => expect(router.currentRoute.value.query).toEqual({ view: 'side', words: '0' }));
    await nextTick();
    expect(comparison.from.value).toBe(2);
  });
});

describe('useRestoreAction', () => {
  const run = async (outcome: () => Promise<{ outcome: 'saved' | 'unchanged'; revision: number }>) => {
    const done = vi.fn();
    const action = useRestoreAction(
      (_n: number, _base: number) => outcome(),
      () => 4,
      (result) => result.revision,
      done,
    );
    await action.run({ number: 2, message: '' });
    return { action, done, notices: useNotifierStore().queue };
  };

  it('announces the new revision after a restore', async () => {
    const { done, notices, action } = await run(async () => ({ outcome: 'saved', revision: 5 }));
    expect(notices.map((n) => [n.tone, n.text])).toEqual([['success', 'Restored revision #2 as a new revision, #5.']]);
    expect(done).toHaveBeenCalledOnce();
    expect(action.restoring.value).toBeNull();
  });

  it('says so when the restored content was already current', async () => {
    const { notices } = await run(async () => ({ outcome: 'unchanged', revision: 4 }));
    expect(notices[0]!.tone).toBe('info');
    expect(notices[0]!.text).toContain('no new revision was needed');
  });

  it('flags a conflict when the item moved on, without a notice', async () => {
    const { action, done, notices } = await run(async () => {
      throw new ApiError(409, 'edit_conflict', 'The document changed');
    });
    expect(action.conflict.value).toBe(true);
    expect(done).not.toHaveBeenCalled();
    expect(notices).toHaveLength(0);
  });
});

describe('presentation helpers', () => {
  it('names origins in plain words, with the source of a restore when the message gives it', () => {
    const label = (over: Partial<RevisionSummary>) => originLabel(summary(5, over));
    expect(label({ origin: 'create' })).toBe('created');
    expect(label({ origin: 'edit' })).toBe('edited');
    expect(label({ origin: 'merge' })).toBe('merged with a concurrent edit');
    expect(label({ origin: 'restore', message: 'Restored revision 2' })).toBe('restored from #2');
    expect(label({ origin: 'restore', message: 'Back to #3, the LDO fix was wrong' })).toBe('restored from #3');
    expect(label({ origin: 'restore', message: 'Undo the bad edit' })).toBe('restored');
    // A number that cannot be an earlier revision is not trusted.
    expect(label({ origin: 'restore', message: 'Restored revision 9' })).toBe('restored');
    expect(label({ origin: 'proposal' })).toBe('accepted proposal');
    expect(label({ origin: 'resolve' })).toBe('conflict resolved');
  });

  it('words times relative to now', () => {
    const now = new Date('2026-03-14T12:00:00Z');
    expect(relativeTime('2026-03-14T11:59:40Z', now)).toBe('just now');
    expect(relativeTime('2026-03-14T11:15:00Z', now)).toBe('45 minutes ago');
    expect(relativeTime('2026-03-13T12:00:00Z', now)).toBe('yesterday');
    expect(relativeTime('2026-03-11T12:00:00Z', now)).toBe('3 days ago');
    expect(relativeTime('2025-12-14T12:00:00Z', now)).toBe('3 months ago');
  });

  it('shortens a content hash to eight characters', () => {
    expect(shortHash('9f86d081884c7d659a2feaa0c55ad015a3bf4f1b2b0b822cd15d6c15b0f00a08')).toBe('9f86d081');
  });
});
