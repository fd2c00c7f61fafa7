/**
 * Three-way merge behind the "no lost updates" rule. A save names the revision it was based on;
 * when the stored document has moved on since, the writer's changes (`ours`) and the changes
 * already stored (`theirs`) are both replayed onto that base. Changes in separate places merge;
 * changes to the same place come back as conflicts for the resolution view.
 *
 * Decisions (see the tests for worked examples):
 * - Line-based, with diff3 regions from node-diff3 (3.2.1+, whose line index cannot be confused by
 *   lines such as `constructor` or `__proto__`).
 * - Edits on adjacent lines conflict, as in diff3: hunks that touch are one region. In Markdown
 *   neighbouring lines are usually one list, table or paragraph block, so a person should look.
 *   One unchanged line between two edits is enough for them to merge.
 * - The same change made on both sides is taken once, not reported.
 * - Lines are compared without their line breaks, so CRLF and LF copies of a line are equal. A merged
 *   text uses the line break of `ours` (the writer's editor), else of `theirs`, else `\n`.
 * - The final line break is merged on its own, like a one-bit field: if `ours` added or removed it,
 *   ours wins, else theirs. When one side is unchanged from base the other side's text is returned
 *   byte for byte.
 */
import { diff3Merge } from 'node-diff3';
import { z } from 'zod';
import { splitLines, type FieldValue } from './diff';

export type MergeChunk =
  | { kind: 'stable'; text: string }
  | {
      kind: 'conflict';
      id: string;
      ours: string;
      base: string;
      theirs: string;
      /** 1-based line where the region starts in each version, for "line 14 in your copy". */
      lines: { ours: number; base: number; theirs: number };
    };

export type ConflictChunk = Extract<MergeChunk, { kind: 'conflict' }>;

export type TextMerge = { clean: true; text: string } | { clean: false; chunks: MergeChunk[] };

/** How the writer settles one conflict: one side, both (ours above theirs), or their own text. */
export const conflictChoiceSchema = z.union([
  z.enum(['ours', 'theirs', 'both']),
  z.object({ text: z.string() }).strict(),
]);
export type ConflictChoice = z.infer<typeof conflictChoiceSchema>;

/** Choices keyed by conflict id, as a resolution form sends them. */
export const conflictChoicesSchema = z.record(z.string(), conflictChoiceSchema);
export type ConflictChoices = z.infer<typeof conflictChoicesSchema>;

/** Thrown by `resolveChunks` when a conflict has no choice; `missing` lists the conflict ids. */
export class UnresolvedConflictsError extends Error {
  readonly missing: string[];
  constructor(missing: string[]) {
    super(`No choice was made for ${missing.length === 1 ? 'conflict' : 'conflicts'} ${missing.join(', ')}`);
    this.name = 'UnresolvedConflictsError';
    this.missing = missing;
  }
}

/**
 * Merges `ours` (what the writer is saving, based on `base`) with `theirs` (the stored text, which
 * moved on from `base`).
 *
 * Chunk texts are whole lines, each ending with a line break, so joining them gives the document.
 * The exception is the last chunk: a stable last chunk ends as the merged document ends, and in a
 * conflict at the very end each side ends as that version of the document ends.
 */
export function mergeText(base: string, ours: string, theirs: string): TextMerge {
  if (ours === theirs || theirs === base) return { clean: true, text: ours };
  if (ours === base) return { clean: true, text: theirs };

  const o = readLines(base);
  const a = readLines(ours);
  const b = readLines(theirs);
  const eol = a.eol ?? b.eol ?? o.eol ?? '\n';
  // Only a side that changed the final line break decides it; both changing it means they agree.
  const finalBreak = a.finalBreak !== o.finalBreak ? a.finalBreak : b.finalBreak;

  const regions = diff3Merge(a.lines, o.lines, b.lines, { excludeFalseConflicts: true });
  const chunks: MergeChunk[] = [];
  let conflicts = 0;
  regions.forEach((region, index) => {
    const last = index === regions.length - 1;
    if (region.ok) {
      chunks.push({ kind: 'stable', text: render(region.ok, eol, last ? finalBreak : true) });
    } else if (region.conflict) {
      const c = region.conflict;
      conflicts++;
      chunks.push({
        kind: 'conflict',
        id: `conflict-${conflicts}`,
        ours: render(c.a, eol, last ? a.finalBreak : true),
        base: render(c.o, eol, last ? o.finalBreak : true),
        theirs: render(c.b, eol, last ? b.finalBreak : true),
        lines: { ours: c.aIndex + 1, base: c.oIndex + 1, theirs: c.bIndex + 1 },
      });
    }
  });

  if (conflicts === 0) {
    return { clean: true, text: chunks.map((chunk) => (chunk.kind === 'stable' ? chunk.text : '')).join('') };
  }
  return { clean: false, chunks };
}

/**
 * Rebuilds the document from the chunks of a conflicted merge and one choice per conflict. Pieces
 * are joined as whole lines: a piece that does not end with a line break (a hand-edited text, or
 * ours under "both") gets one before the next piece. Choices for unknown ids are ignored.
 *
 * @throws UnresolvedConflictsError when any conflict has no choice.
 */
export function resolveChunks(
  chunks: readonly MergeChunk[],
  choices: Readonly<Record<string, ConflictChoice>>,
): string {
  const missing = chunks
    .filter((chunk): chunk is ConflictChunk => chunk.kind === 'conflict' && !Object.hasOwn(choices, chunk.id))
    .map((chunk) => chunk.id);
  if (missing.length > 0) throw new UnresolvedConflictsError(missing);

  const eol = firstLineBreak(chunks) ?? '\n';
  const pieces: string[] = [];
  for (const chunk of chunks) {
    if (chunk.kind === 'stable') {
      pieces.push(chunk.text);
      continue;
    }
    const choice = choices[chunk.id]!;
    if (choice === 'ours') pieces.push(chunk.ours);
    else if (choice === 'theirs') pieces.push(chunk.theirs);
    else if (choice === 'both') pieces.push(chunk.ours, chunk.theirs);
    else pieces.push(choice.text);
  }

  let text = '';
  for (const piece of pieces) {
    if (piece === '') continue;
    if (text !== '' && !text.endsWith('\n')) text += eol;
    text += piece;
  }
  return text;
}

// --- Structured records ---------------------------------------------------------------------------

export interface FieldConflict<K extends string = string> {
  field: K;
  base: FieldValue;
  ours: FieldValue;
  theirs: FieldValue;
  /** For text fields, the line-level merge, so the resolution view can show only the clashing lines. */
  chunks?: MergeChunk[];
}

export type FieldsMerge<T> =
  { clean: true; fields: T } | { clean: false; fields: T; conflicts: FieldConflict<keyof T & string>[] };

/**
 * Merges a structured record field by field, over the union of the three versions' keys.
 *
 * - A field changed on one side only takes that side; changed identically on both, either.
 * - Strings changed on both sides are merged line by line with `mergeText`. Multi-line text
 *   (symptom, cause, workaround, fix) thus keeps both writers' edits to different paragraphs, while
 *   a single-line value (title, severity, status) is one line and conflicts whenever the two sides
 *   chose differently, exactly as a whole-value comparison would. A missing string counts as empty.
 * - String arrays are sets (order ignored): the merge removes what either side removed and adds what
 *   either side added, which never conflicts. The result keeps theirs' order, then ours' additions.
 * - Anything else changed on both sides to different values is a conflict.
 *
 * A conflicting field holds theirs (the stored value) in `fields` until the writer chooses.
 */
export function mergeFields<T extends { [K in keyof T]: FieldValue }>(base: T, ours: T, theirs: T): FieldsMerge<T> {
  const fields = { ...theirs } as Record<string, FieldValue>;
  const conflicts: FieldConflict<keyof T & string>[] = [];
  const keys = new Set([...Object.keys(base), ...Object.keys(ours), ...Object.keys(theirs)]);
  const read = (record: T, key: string): FieldValue =>
    Object.hasOwn(record, key) ? (record as Record<string, FieldValue>)[key] : undefined;

  for (const key of keys) {
    const field = key as keyof T & string;
    const o = read(base, key);
    const a = read(ours, key);
    const b = read(theirs, key);

    if (sameValue(a, o) || sameValue(a, b)) {
      setField(fields, key, b);
      continue;
    }
    if (sameValue(b, o)) {
      setField(fields, key, a);
      continue;
    }

    if (isText(o) && isText(a) && isText(b)) {
      const merged = mergeText(o ?? '', a ?? '', b ?? '');
      if (merged.clean) setField(fields, key, merged.text);
      else conflicts.push({ field, base: o, ours: a, theirs: b, chunks: merged.chunks });
    } else if (isList(o) && isList(a) && isList(b)) {
      setField(fields, key, mergeSets(o ?? [], a ?? [], b ?? []));
    } else {
      conflicts.push({ field, base: o, ours: a, theirs: b });
    }
  }

  const result = fields as T;
  return conflicts.length === 0 ? { clean: true, fields: result } : { clean: false, fields: result, conflicts };
}

// --- Internals -----------------------------------------------------------------------------------

interface Lines {
  lines: string[];
  finalBreak: boolean;
  eol: '\n' | '\r\n' | undefined;
}

function readLines(text: string): Lines {
  return { lines: splitLines(text), finalBreak: text.endsWith('\n'), eol: lineBreakOf(text) };
}

function lineBreakOf(text: string): '\n' | '\r\n' | undefined {
  const at = text.indexOf('\n');
  if (at < 0) return undefined;
  return at > 0 && text[at - 1] === '\r' ? '\r\n' : '\n';
}

function firstLineBreak(chunks: readonly MergeChunk[]): '\n' | '\r\n' | undefined {
  for (const chunk of chunks) {
    const found =
      chunk.kind === 'stable'
        ? lineBreakOf(chunk.text)
        : (lineBreakOf(chunk.ours) ?? lineBreakOf(chunk.theirs) ?? lineBreakOf(chunk.base));
    if (found) return found;
  }
  return undefined;
}

function render(lines: readonly string[], eol: string, finalBreak: boolean): string {
  if (lines.length === 0) return '';
  return lines.join(eol) + (finalBreak ? eol : '');
}

// Writing through a plain assignment would treat a record key named `__proto__` as the prototype.
function setField(record: Record<string, FieldValue>, key: string, value: FieldValue): void {
  Object.defineProperty(record, key, { value, enumerable: true, writable: true, configurable: true });
}

function isText(value: FieldValue): value is string | null | undefined {
  return value === null || value === undefined || typeof value === 'string';
}

function isList(value: FieldValue): value is readonly string[] | null | undefined {
  return value === null || value === undefined || Array.isArray(value);
}

/** Equality as the merge sees it: lists as sets, a missing string or list as an empty one. */
function sameValue(x: FieldValue, y: FieldValue): boolean {
  if (x == null && y == null) return true;
  if (Array.isArray(x) || Array.isArray(y)) {
    if (!isList(x) || !isList(y)) return false;
    const xs = new Set<string>(x ?? []);
    const ys = new Set<string>(y ?? []);
    return xs.size === ys.size && [...xs].every((item) => ys.has(item));
  }
  if (typeof x === 'string' || typeof y === 'string') {
    if (!isText(x) || !isText(y)) return false;
    return (x ?? '') === (y ?? '');
  }
  return Object.is(x, y);
}

function mergeSets(base: readonly string[], ours: readonly string[], theirs: readonly string[]): string[] {
  const baseSet = new Set(base);
  const oursSet = new Set(ours);
  const removedByOurs = new Set(base.filter((item) => !oursSet.has(item)));
  const kept = theirs.filter((item) => !removedByOurs.has(item));
  const keptSet = new Set(kept);
  const addedByOurs = ours.filter((item) => !baseSet.has(item) && !keptSet.has(item));
  return [...new Set([...kept, ...addedByOurs])];
}
