/**
 * Revision history of a write-up document (section or log entry) and of a project's metadata:
 * the list, single revisions (cached, since a comparison fetches the same ones again and again)
 * and restoring an earlier revision, which the server records as a new revision.
 */
import type {
  DocumentDetail,
  DocumentSaveResult,
  ProjectDetail,
  ProjectSaveResult,
  Restore,
  SaveOutcome,
  RevisionDetail,
  RevisionList,
  RevisionSummary,
} from '@shared/contracts/projects';
import { computed, ref, toValue, watch, type ComputedRef, type MaybeRefOrGetter, type Ref } from 'vue';
import { useRoute, useRouter, type LocationQuery, type LocationQueryValue } from 'vue-router';
import { ApiError, http } from './http';
import { reportUnexpected, useNotifier } from './notifier';

export interface RevisionHistory<Subject, SaveResult> {
  /** Newest first, as the server lists them. */
  revisions: Ref<RevisionSummary[]>;
  /** The item itself (current revision, title, the viewer's permissions); null until loaded. */
  subject: Ref<Subject | null>;
  loading: Ref<boolean>;
  /** Loads the item and its revision list together. */
  load(): Promise<void>;
  fetchRevision(number: number): Promise<RevisionDetail>;
  /** Restores `number` on top of `baseRevision`, then reloads the list. */
  restore(number: number, baseRevision: number, message?: string): Promise<SaveResult>;
}

export interface HistoryEndpoints<Subject, SaveResult> {
  subjectPath: () => string;
  historyPath: () => string;
  restorePath: () => string;
  restoreBody: (number: number, baseRevision: number, message: string) => Restore;
  subjectOf: (result: SaveResult) => Subject;
}

/** The history of any versioned item, given where it lives; the per-kind composables wrap it. */
export function useRevisionHistory<Subject, SaveResult>(
  endpoints: HistoryEndpoints<Subject, SaveResult>,
): RevisionHistory<Subject, SaveResult> {
  const revisions = ref<RevisionSummary[]>([]);
  const subject = ref<Subject | null>(null) as Ref<Subject | null>;
  const loading = ref(false);
  // Revisions never change once written, so a fetched one stays valid for the page's lifetime.
  // Keyed by the full path: the same page component is reused when the route params change.
  // Promises are cached so two views asking for one revision at once share a request.
  const cache = new Map<string, Promise<RevisionDetail>>();

  async function load() {
    loading.value = true;
    try {
      const [item, list] = await Promise.all([
        http.get<Subject>(endpoints.subjectPath()),
        http.get<RevisionList>(endpoints.historyPath()),
      ]);
      subject.value = item;
      revisions.value = list.items;
    } finally {
      loading.value = false;
    }
  }

  function fetchRevision(number: number): Promise<RevisionDetail> {
    const path = `${endpoints.historyPath()}/${number}`;
    let pending = cache.get(path);
    if (!pending) {
      pending = http.get<RevisionDetail>(path);
      cache.set(path, pending);
      // A failed fetch must not stick: the next attempt asks the server again.
      pending.catch(() => cache.delete(path));
    }
    return pending;
  }

  async function restore(number: number, baseRevision: number, message = ''): Promise<SaveResult> {
    const result = await http.post<SaveResult>(
      endpoints.restorePath(),
      endpoints.restoreBody(number, baseRevision, message.trim()),
    );
    subject.value = endpoints.subjectOf(result);
    await load();
    return result;
  }

  return { revisions, subject, loading, load, fetchRevision, restore };
}

const enc = encodeURIComponent;

/** History of one write-up section or log entry. */
export function useDocumentHistory(
  slug: MaybeRefOrGetter<string>,
  documentId: MaybeRefOrGetter<string | number>,
): RevisionHistory<DocumentDetail, DocumentSaveResult> & { document: Ref<DocumentDetail | null> } {
  const base = () => `/projects/${enc(toValue(slug))}/documents/${enc(String(toValue(documentId)))}`;
  const history = useRevisionHistory<DocumentDetail, DocumentSaveResult>({
    subjectPath: base,
    historyPath: () => `${base()}/revisions`,
    restorePath: () => `${base()}/restore`,
    restoreBody: (number, baseRevision, message) => ({ number, baseRevision, message }),
    subjectOf: (result) => result.document,
  });
  return { ...history, document: history.subject };
}

/** History of a project's metadata (title, summary, licence, source repository, hazard marks). */
export function useProjectHistory(
  slug: MaybeRefOrGetter<string>,
): RevisionHistory<ProjectDetail, ProjectSaveResult> & { project: Ref<ProjectDetail | null> } {
  const base = () => `/projects/${enc(toValue(slug))}`;
  const history = useRevisionHistory<ProjectDetail, ProjectSaveResult>({
    subjectPath: base,
    historyPath: () => `${base()}/revisions`,
    restorePath: () => `${base()}/restore`,
    restoreBody: (number, baseRevision, message) => ({ number, baseRevision, message }),
    subjectOf: (result) => result.project,
  });
  return { ...history, project: history.subject };
}

// --- Presentation helpers shared by the history components and pages ---------------------------

/**
 * The revision `number` was saved on: its parent when listed, else the next older listed one, else
 * null (the first revision, compared against nothing).
 */
export function previousRevision(revisions: readonly RevisionSummary[], number: number): number | null {
  const index = revisions.findIndex((r) => r.number === number);
  if (index < 0) return null;
  const parent = revisions[index]!.parentNumber;
  if (parent !== null && revisions.some((r) => r.number === parent)) return parent;
  return revisions[index + 1]?.number ?? null;
}

/** The comparison a history page opens with: the newest revision against the one it was saved on. */
export function defaultComparison(revisions: readonly RevisionSummary[]): { from: number | null; to: number | null } {
  const newest = revisions[0];
  if (!newest) return { from: null, to: null };
  return { from: previousRevision(revisions, newest.number), to: newest.number };
}

/**
 * The revision a restore copied, when the server's message names it ("#3" or "revision 3").
 * The contract has no field for it, so anything else yields null and the label stays generic.
 */
export function restoredFrom(summary: Pick<RevisionSummary, 'origin' | 'message' | 'number'>): number | null {
  if (summary.origin !== 'restore') return null;
  const match = /(?:#|\brevision\s+)(\d+)\b/i.exec(summary.message);
  if (!match) return null;
  const number = Number(match[1]);
  return number >= 1 && number < summary.number ? number : null;
}

/** Our plain words for how a revision came about. */
export function originLabel(summary: Pick<RevisionSummary, 'origin' | 'message' | 'number'>): string {
  switch (summary.origin) {
    case 'create':
      return 'created';
    case 'edit':
      return 'edited';
    case 'merge':
      return 'merged with a concurrent edit';
    case 'restore': {
      const source = restoredFrom(summary);
      return source === null ? 'restored' : `restored from #${source}`;
    }
    case 'proposal':
      return 'accepted proposal';
    case 'resolve':
      return 'conflict resolved';
  }
}

/** The first characters of a content hash: enough to tell revisions with equal content apart. */
export function shortHash(hash: string): string {
  return hash.replace(/^[a-z0-9]+:/i, '').slice(0, 8);
}

const UNITS: [Intl.RelativeTimeFormatUnit, number][] = [
  ['year', 365 * 24 * 3600],
  ['month', 30 * 24 * 3600],
  ['week', 7 * 24 * 3600],
  ['day', 24 * 3600],
  ['hour', 3600],
  ['minute', 60],
];

/** "3 days ago", "just now"; `now` is a parameter so the wording can be checked. */
export function relativeTime(iso: string, now: Date = new Date()): string {
  const seconds = (new Date(iso).getTime() - now.getTime()) / 1000;
  if (Number.isNaN(seconds)) return '';
  const format = new Intl.RelativeTimeFormat('en', { numeric: 'auto' });
  for (const [unit, size] of UNITS) {
    if (Math.abs(seconds) >= size) return format.format(Math.round(seconds / size), unit);
  }
  return 'just now';
}

// --- The comparison a history page shows, kept in the URL ----------------------------------------

export type DiffLayout = 'inline' | 'side-by-side';

function firstValue(value: LocationQueryValue | LocationQueryValue[] | undefined): string | null {
  return (Array.isArray(value) ? value[0] : value) ?? null;
}

/**
 * Reads a comparison from a history page's query (`?from=2&to=5&view=side&words=1`). Numbers that
 * are not in the list fall back to the default comparison, so an old or mistyped link still opens
 * something sensible; with only `to`, `from` is the revision `to` was saved on.
 */
export function comparisonFromQuery(
  query: LocationQuery,
  revisions: readonly RevisionSummary[],
): { from: number | null; to: number | null; layout: DiffLayout; words: boolean } {
  const listed = (raw: string | null) => {
    if (raw === null || !/^\d+$/.test(raw)) return null;
    const n = Number(raw);
    return revisions.some((r) => r.number === n) ? n : null;
  };
  const fallback = defaultComparison(revisions);
  const to = listed(firstValue(query.to)) ?? fallback.to;
  const rawFrom = firstValue(query.from);
  const from =
    rawFrom === null ? (to === null ? null : previousRevision(revisions, to)) : (listed(rawFrom) ?? fallback.from);
  return {
    from,
    to,
    layout: firstValue(query.view) === 'side' ? 'side-by-side' : 'inline',
    words: firstValue(query.words) !== '0',
  };
}

export interface HistoryComparison {
  from: ComputedRef<number | null>;
  to: ComputedRef<number | null>;
  layout: ComputedRef<DiffLayout>;
  words: ComputedRef<boolean>;
  /** The two revisions being compared; `fromRevision` is null when comparing against nothing. */
  fromRevision: Ref<RevisionDetail | null>;
  toRevision: Ref<RevisionDetail | null>;
  /** Fetching the picked revisions. */
  comparing: Ref<boolean>;
  /** Set when a picked revision could not be read (deleted item, revoked access). */
  problem: Ref<string | null>;
  pick(side: 'from' | 'to', number: number | null): void;
  setLayout(layout: DiffLayout): void;
  setWords(words: boolean): void;
  /** Back to the default comparison (newest against its parent), e.g. after a restore. */
  reset(): void;
}

/**
 * The comparison on the current route's query, and the two revisions it names, fetched through
 * `fetchRevision`. Changes replace the history entry, so the back button leaves the page instead of
 * stepping through every radio button the reader tried.
 */
export function useHistoryComparison(
  revisions: Ref<RevisionSummary[]>,
  fetchRevision: (number: number) => Promise<RevisionDetail>,
): HistoryComparison {
  const route = useRoute();
  const router = useRouter();
  const parsed = computed(() => comparisonFromQuery(route.query, revisions.value));

  const fromRevision = ref<RevisionDetail | null>(null);
  const toRevision = ref<RevisionDetail | null>(null);
  const comparing = ref(false);
  const problem = ref<string | null>(null);

  // Navigation is asynchronous: a second change made before the first one lands (a layout toggle
  // right after a pick) must build on the first, not on the query the route still shows.
  let pending: LocationQuery | null = null;

  function writeQuery(patch: Record<string, string | undefined>) {
    const query: LocationQuery = {};
    for (const [key, value] of Object.entries({ ...(pending ?? route.query), ...patch })) {
      const single = Array.isArray(value) ? value[0] : value;
      if (single !== undefined && single !== null) query[key] = single;
    }
    pending = query;
    router
      .replace({ query })
      .catch(reportUnexpected)
      .finally(() => {
        if (pending === query) pending = null;
      });
  }

  function pick(side: 'from' | 'to', number: number | null) {
    const current = pending ? comparisonFromQuery(pending, revisions.value) : parsed.value;
    const next = { from: current.from, to: current.to, [side]: number };
    // Both ends go into the URL so a shared link shows the same comparison whatever is saved later.
    writeQuery({
      from: next.from === null ? undefined : String(next.from),
      to: next.to === null ? undefined : String(next.to),
    });
  }

  let request = 0;
  watch(
    () => [parsed.value.from, parsed.value.to] as const,
    async ([from, to]) => {
      const mine = ++request;
      if (to === null) {
        fromRevision.value = null;
        toRevision.value = null;
        return;
      }
      comparing.value = true;
      problem.value = null;
      try {
        const [older, newer] = await Promise.all([from === null ? null : fetchRevision(from), fetchRevision(to)]);
        if (mine !== request) return;
        fromRevision.value = older;
        toRevision.value = newer;
      } catch (error) {
        if (mine !== request) return;
        if (error instanceof ApiError && (error.code === 'not_found' || error.code === 'forbidden')) {
          problem.value = error.message;
        } else reportUnexpected(error);
      } finally {
        if (mine === request) comparing.value = false;
      }
    },
    { immediate: true },
  );

  return {
    from: computed(() => parsed.value.from),
    to: computed(() => parsed.value.to),
    layout: computed(() => parsed.value.layout),
    words: computed(() => parsed.value.words),
    fromRevision,
    toRevision,
    comparing,
    problem,
    pick,
    setLayout: (layout) => writeQuery({ view: layout === 'side-by-side' ? 'side' : 'inline' }),
    setWords: (words) => writeQuery({ words: words ? '1' : '0' }),
    reset: () => writeQuery({ from: undefined, to: undefined }),
  };
}

// --- Restoring, with the outcomes a page must tell the reader about -----------------------------

/**
 * Runs a restore and says what happened: success (or "nothing to restore" when the content was
 * already current), a conflict when the item moved on since the page loaded (`conflict` becomes
 * true and the page asks the reader to reload), a refusal as an error notice.
 */
export function useRestoreAction<Result extends { outcome: SaveOutcome }>(
  restore: (number: number, baseRevision: number, message?: string) => Promise<Result>,
  currentRevision: () => number | null,
  revisionOf: (result: Result) => number,
  onRestored: () => void,
) {
  const notify = useNotifier();
  const restoring = ref<number | null>(null);
  const conflict = ref(false);

  async function run({ number, message }: { number: number; message: string }) {
    const base = currentRevision();
    if (base === null) return;
    restoring.value = number;
    try {
      const result = await restore(number, base, message);
      if (result.outcome === 'unchanged') {
        notify.info(`Revision #${number} has the same content as the current one; no new revision was needed.`);
      } else {
        notify.success(`Restored revision #${number} as a new revision, #${revisionOf(result)}.`);
      }
      onRestored();
    } catch (error) {
      if (error instanceof ApiError && error.code === 'edit_conflict') conflict.value = true;
      else if (error instanceof ApiError && (error.code === 'forbidden' || error.code === 'not_found')) {
        notify.error(error.message);
      } else reportUnexpected(error);
    } finally {
      restoring.value = null;
    }
  }

  return { restoring, conflict, run };
}
