/**
 * Diffs between two revisions, computed the same way in the browser (revision history, proposal
 * review) and on the server (notification summaries). Pure: no DOM, no node: modules.
 *
 * Lines are compared exactly after splitting on `\r\n` or `\n`, so a revision saved from an editor
 * that writes CRLF does not show every line as changed. A final line break is not a line: `"a\n"` and
 * `"a"` both hold the one line `a`, so the view never shows a phantom empty last line (and a change
 * to the final line break alone shows no rows).
 */
import { diffArrays, diffWordsWithSpace, type ArrayChange, type Change } from 'diff';

export type PartKind = 'same' | 'added' | 'removed';

/** A run of text inside a line or a short field. Joining the texts of one side gives that side back. */
export interface DiffPart {
  text: string;
  kind: PartKind;
}

export interface SameRow {
  kind: 'same';
  oldNumber: number;
  newNumber: number;
  /** Equal to `newText`; both are present so a side-by-side cell reads the same field on every row. */
  oldText: string;
  newText: string;
}

export interface RemovedRow {
  kind: 'removed';
  oldNumber: number;
  oldText: string;
}

export interface AddedRow {
  kind: 'added';
  newNumber: number;
  newText: string;
}

/**
 * A removed line and the added line that replaced it. Inline views draw it as two lines (old with
 * `oldParts`, then new with `newParts`); side-by-side views draw it as one row of two cells.
 * `oldParts` holds only `same`/`removed` parts, `newParts` only `same`/`added`.
 */
export interface ChangedRow {
  kind: 'changed';
  oldNumber: number;
  newNumber: number;
  oldText: string;
  newText: string;
  oldParts: DiffPart[];
  newParts: DiffPart[];
}

export type DiffRow = SameRow | RemovedRow | AddedRow | ChangedRow;

/** Unchanged lines folded away by `collapse`; `rows` lets a view expand them in place. */
export interface SkipRow {
  kind: 'skip';
  count: number;
  /** Line numbers of the first hidden line, for a label such as "lines 12–40 unchanged". */
  oldNumber: number;
  newNumber: number;
  rows: SameRow[];
}

export type ViewRow = DiffRow | SkipRow;

export interface DiffStats {
  added: number;
  removed: number;
  changed: number;
}

/** Splits on `\r\n` or `\n`; a trailing line break does not start another line; `''` has no lines. */
export function splitLines(text: string): string[] {
  if (text === '') return [];
  const lines = text.split(/\r?\n/);
  if (lines[lines.length - 1] === '') lines.pop();
  return lines;
}

/** Word-level parts of two short texts, in reading order (removed before added within a change). */
export function diffWords(oldText: string, newText: string): DiffPart[] {
  if (oldText === newText) return oldText === '' ? [] : [{ text: oldText, kind: 'same' }];
  return tidyParts(diffWordsWithSpace(oldText, newText));
}

/** The parts one side of a side-by-side view shows: the old side drops additions, the new side removals. */
export function partsForSide(parts: readonly DiffPart[], side: 'old' | 'new'): DiffPart[] {
  const hidden: PartKind = side === 'old' ? 'added' : 'removed';
  return joinAdjacent(parts.filter((part) => part.kind !== hidden));
}

/**
 * Rows for an inline or side-by-side view of two revisions of a Markdown document.
 *
 * Within a block of replaced lines, a removed line is paired with an added line (a `changed` row
 * with word parts) only when they share at least half their words, and pairs keep their order. So
 * inserting a paragraph above an edited one pairs the edited paragraph with its new wording instead
 * of with the inserted one, and a paragraph rewritten from scratch shows as removed plus added
 * rather than as a word diff that is all noise.
 */
export function diffLinesForView(oldText: string, newText: string): DiffRow[] {
  const oldLines = splitLines(oldText);
  const newLines = splitLines(newText);
  const rows: DiffRow[] = [];
  let oldNumber = 1;
  let newNumber = 1;
  let removed: string[] = [];
  let added: string[] = [];

  const flush = () => {
    for (const row of pairBlock(removed, added, oldNumber, newNumber)) rows.push(row);
    oldNumber += removed.length;
    newNumber += added.length;
    removed = [];
    added = [];
  };

  for (const change of lineChanges(oldLines, newLines)) {
    if (change.removed) removed.push(...change.value);
    else if (change.added) added.push(...change.value);
    else {
      flush();
      for (const line of change.value) {
        rows.push({ kind: 'same', oldNumber: oldNumber++, newNumber: newNumber++, oldText: line, newText: line });
      }
    }
  }
  flush();
  return rows;
}

/**
 * Folds runs of unchanged rows, keeping `context` rows next to each change. A run is folded only
 * when it would hide at least two rows: a marker in place of a single line saves no space.
 */
export function collapse(rows: readonly DiffRow[], context = 3): ViewRow[] {
  const keep = Math.max(0, Math.floor(context));
  const result: ViewRow[] = [];
  let index = 0;
  while (index < rows.length) {
    const row = rows[index]!;
    if (row.kind !== 'same') {
      result.push(row);
      index++;
      continue;
    }
    let end = index;
    const run: SameRow[] = [];
    while (end < rows.length && rows[end]!.kind === 'same') run.push(rows[end++] as SameRow);

    const head = index === 0 ? 0 : keep;
    const tail = end === rows.length ? 0 : keep;
    const hidden = run.length - head - tail;
    if (hidden < 2) {
      result.push(...run);
    } else {
      result.push(...run.slice(0, head));
      const folded = run.slice(head, head + hidden);
      const first = folded[0]!;
      result.push({
        kind: 'skip',
        count: hidden,
        oldNumber: first.oldNumber,
        newNumber: first.newNumber,
        rows: folded,
      });
      result.push(...run.slice(head + hidden));
    }
    index = end;
  }
  return result;
}

/** Counts rows by kind; a `changed` row counts once as changed, not as one removed plus one added. */
export function diffStats(rows: readonly ViewRow[]): DiffStats {
  const stats: DiffStats = { added: 0, removed: 0, changed: 0 };
  for (const row of rows) {
    if (row.kind === 'added') stats.added++;
    else if (row.kind === 'removed') stats.removed++;
    else if (row.kind === 'changed') stats.changed++;
  }
  return stats;
}

// --- Structured records ---------------------------------------------------------------------------

/** What a field of a structured record (an erratum, a lesson) may hold for diffing and merging. */
export type FieldValue = string | number | boolean | null | undefined | readonly string[];

export type FieldChange<K extends string = string> =
  | { field: K; label: string; kind: 'text'; before: string; after: string; parts: DiffPart[] }
  | { field: K; label: string; kind: 'set'; before: string[]; after: string[]; added: string[]; removed: string[] }
  | { field: K; label: string; kind: 'value'; before: FieldValue; after: FieldValue };

/**
 * The fields that differ between two versions of a record, in the order of `labels`. Only fields
 * named in `labels` are compared, so ids and timestamps stay out of the view. Strings get word
 * parts (a missing string counts as empty, since a reader cannot tell the two apart); string arrays
 * are compared as sets, so reordering alone is no change; anything else is shown before/after.
 * Enumerated values (severity, status) read better mapped to their display labels before diffing.
 */
export function diffFields<T extends { [K in keyof T]: FieldValue }>(
  oldFields: T,
  newFields: T,
  labels: { readonly [K in keyof T & string]?: string },
): FieldChange<keyof T & string>[] {
  const changes: FieldChange<keyof T & string>[] = [];
  for (const field of Object.keys(labels) as (keyof T & string)[]) {
    const label = labels[field];
    if (label === undefined) continue;
    const before: FieldValue = oldFields[field];
    const after: FieldValue = newFields[field];

    if (isTextLike(before) && isTextLike(after) && (typeof before === 'string' || typeof after === 'string')) {
      const oldText = before ?? '';
      const newText = after ?? '';
      if (oldText !== newText) {
        changes.push({
          field,
          label,
          kind: 'text',
          before: oldText,
          after: newText,
          parts: diffWords(oldText, newText),
        });
      }
    } else if (isListLike(before) && isListLike(after)) {
      const oldItems = [...(before ?? [])];
      const newItems = [...(after ?? [])];
      const oldSet = new Set(oldItems);
      const newSet = new Set(newItems);
      const addedItems = unique(newItems.filter((item) => !oldSet.has(item)));
      const removedItems = unique(oldItems.filter((item) => !newSet.has(item)));
      if (addedItems.length > 0 || removedItems.length > 0) {
        changes.push({
          field,
          label,
          kind: 'set',
          before: oldItems,
          after: newItems,
          added: addedItems,
          removed: removedItems,
        });
      }
    } else if (!Object.is(before, after)) {
      changes.push({ field, label, kind: 'value', before, after });
    }
  }
  return changes;
}

// --- Internals -----------------------------------------------------------------------------------

function isTextLike(value: FieldValue): value is string | null | undefined {
  return value === null || value === undefined || typeof value === 'string';
}

function isListLike(value: FieldValue): value is readonly string[] | null | undefined {
  return value === null || value === undefined || Array.isArray(value);
}

function unique(items: string[]): string[] {
  return [...new Set(items)];
}

// The line diff costs time in proportion to lines × edits; past this many line edits (a wholesale
// rewrite) the middle of the document is shown as one replaced block between the unchanged head and
// tail, so a history view stays responsive. A fixed edit budget, unlike a timeout, gives the same rows
// in the browser and on the server.
const MAX_LINE_EDITS = 1000;

function lineChanges(oldLines: string[], newLines: string[]): ArrayChange<string>[] {
  const exact = diffArrays(oldLines, newLines, { maxEditLength: MAX_LINE_EDITS });
  if (exact) return exact;
  let head = 0;
  while (head < oldLines.length && head < newLines.length && oldLines[head] === newLines[head]) head++;
  let tail = 0;
  while (
    tail < oldLines.length - head &&
    tail < newLines.length - head &&
    oldLines[oldLines.length - 1 - tail] === newLines[newLines.length - 1 - tail]
  ) {
    tail++;
  }
  const change = (value: string[], kind: 'same' | 'removed' | 'added'): ArrayChange<string> => ({
    value,
    count: value.length,
    added: kind === 'added',
    removed: kind === 'removed',
  });
  return [
    change(oldLines.slice(0, head), 'same'),
    change(oldLines.slice(head, oldLines.length - tail), 'removed'),
    change(newLines.slice(head, newLines.length - tail), 'added'),
    change(oldLines.slice(oldLines.length - tail), 'same'),
  ].filter((c) => c.count > 0);
}

// Pairing a block costs removed × added similarity scores; past this the block is paired in order.
const MAX_ALIGNED_PAIRS = 10_000;
const PAIRING_THRESHOLD = 0.5;

function pairBlock(removed: string[], added: string[], oldStart: number, newStart: number): DiffRow[] {
  const pairs = alignBlock(removed, added);
  const rows: DiffRow[] = [];
  let r = 0;
  let a = 0;
  const emitUntil = (rEnd: number, aEnd: number) => {
    for (; r < rEnd; r++) rows.push({ kind: 'removed', oldNumber: oldStart + r, oldText: removed[r]! });
    for (; a < aEnd; a++) rows.push({ kind: 'added', newNumber: newStart + a, newText: added[a]! });
  };
  for (const [ri, ai] of pairs) {
    emitUntil(ri, ai);
    const oldText = removed[ri]!;
    const newText = added[ai]!;
    r = ri + 1;
    a = ai + 1;
    // Only the coarse fallback of `lineChanges` can pair a line with an identical one.
    if (oldText === newText) {
      rows.push({ kind: 'same', oldNumber: oldStart + ri, newNumber: newStart + ai, oldText, newText });
      continue;
    }
    const parts = diffWords(oldText, newText);
    rows.push({
      kind: 'changed',
      oldNumber: oldStart + ri,
      newNumber: newStart + ai,
      oldText,
      newText,
      oldParts: partsForSide(parts, 'old'),
      newParts: partsForSide(parts, 'new'),
    });
  }
  emitUntil(removed.length, added.length);
  return rows;
}

/** Index pairs [removed, added], increasing in both, maximising total similarity above the threshold. */
function alignBlock(removed: string[], added: string[]): [number, number][] {
  const n = removed.length;
  const m = added.length;
  if (n === 0 || m === 0) return [];
  const removedTokens = removed.map(wordTokens);
  const addedTokens = added.map(wordTokens);
  const score = (i: number, j: number) => {
    const s = similarity(removedTokens[i]!, addedTokens[j]!);
    return s >= PAIRING_THRESHOLD ? s : 0;
  };

  if (n * m > MAX_ALIGNED_PAIRS) {
    const pairs: [number, number][] = [];
    for (let i = 0; i < Math.min(n, m); i++) if (score(i, i) > 0) pairs.push([i, i]);
    return pairs;
  }

  // Weighted longest-common-subsequence over the similarity matrix.
  const best: number[][] = Array.from({ length: n + 1 }, () => new Array<number>(m + 1).fill(0));
  const gain: number[][] = Array.from({ length: n }, () => new Array<number>(m).fill(0));
  for (let i = 1; i <= n; i++) {
    for (let j = 1; j <= m; j++) {
      const g = score(i - 1, j - 1);
      gain[i - 1]![j - 1] = g;
      const diagonal = g > 0 ? best[i - 1]![j - 1]! + g : 0;
      best[i]![j] = Math.max(best[i - 1]![j]!, best[i]![j - 1]!, diagonal);
    }
  }
  const pairs: [number, number][] = [];
  let i = n;
  let j = m;
  while (i > 0 && j > 0) {
    const g = gain[i - 1]![j - 1]!;
    if (g > 0 && best[i]![j] === best[i - 1]![j - 1]! + g) {
      pairs.push([i - 1, j - 1]);
      i--;
      j--;
    } else if (best[i - 1]![j] === best[i]![j]) i--;
    else j--;
  }
  return pairs.reverse();
}

function wordTokens(line: string): string[] {
  return line.match(/[\p{L}\p{N}_]+|[^\s\p{L}\p{N}_]/gu) ?? [];
}

/** Dice coefficient over token multisets: 1 when the lines use the same words, 0 when none in common. */
function similarity(a: readonly string[], b: readonly string[]): number {
  if (a.length === 0 && b.length === 0) return 1;
  const counts = new Map<string, number>();
  for (const token of a) counts.set(token, (counts.get(token) ?? 0) + 1);
  let common = 0;
  for (const token of b) {
    const left = counts.get(token) ?? 0;
    if (left > 0) {
      common++;
      counts.set(token, left - 1);
    }
  }
  return (2 * common) / (a.length + b.length);
}

/**
 * The word diff keeps every space as its own token so each side rebuilds exactly, but that leaves
 * single spaces marked "same" between changed words ("~~warm~~ hot ~~at~~ by"). A space-only run
 * between two changes is folded into them so the change reads as one phrase.
 */
function tidyParts(changes: readonly Change[]): DiffPart[] {
  const parts: DiffPart[] = changes
    .filter((change) => change.value !== '')
    .map((change) => ({ text: change.value, kind: change.added ? 'added' : change.removed ? 'removed' : 'same' }));

  const isChange = (part: DiffPart | undefined) => part !== undefined && part.kind !== 'same';
  const absorbed: DiffPart[] = [];
  parts.forEach((part, index) => {
    if (
      part.kind === 'same' &&
      /^[^\S\r\n]+$/.test(part.text) &&
      isChange(parts[index - 1]) &&
      isChange(parts[index + 1])
    ) {
      absorbed.push({ text: part.text, kind: 'removed' }, { text: part.text, kind: 'added' });
    } else absorbed.push(part);
  });

  // Within each run of changes, removed text first and added text second, each joined.
  const ordered: DiffPart[] = [];
  let removedText = '';
  let addedText = '';
  const flush = () => {
    if (removedText !== '') ordered.push({ text: removedText, kind: 'removed' });
    if (addedText !== '') ordered.push({ text: addedText, kind: 'added' });
    removedText = '';
    addedText = '';
  };
  for (const part of absorbed) {
    if (part.kind === 'removed') removedText += part.text;
    else if (part.kind === 'added') addedText += part.text;
    else {
      flush();
      ordered.push(part);
    }
  }
  flush();
  return joinAdjacent(ordered);
}

function joinAdjacent(parts: readonly DiffPart[]): DiffPart[] {
  const joined: DiffPart[] = [];
  for (const part of parts) {
    if (part.text === '') continue;
    const last = joined[joined.length - 1];
    if (last && last.kind === part.kind) last.text += part.text;
    else joined.push({ ...part });
  }
  return joined;
}
