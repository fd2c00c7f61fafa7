import { describe, expect, it } from 'vitest';
import {
  conflictChoicesSchema,
  mergeFields,
  mergeText,
  resolveChunks,
  UnresolvedConflictsError,
  type MergeChunk,
} from '../../../shared/merge';

// An invented build write-up; each test edits a copy of it by line number.
const baseLines = [
  '# Tidewatch: a solar tide-gauge logger', // 1
  '', // 2
  'Tidewatch logs the water level every ten minutes.', // 3
  '', // 4
  '## Power', // 5
  '', // 6
  'A 2 W panel charges one 18650 cell.', // 7
  'The 3.3 V LDO runs warm at 300 mA.', // 8
  '', // 9
  '## Assembly', // 10
  '', // 11
  '1. Solder the charger and the LDO first.', // 12
  '2. Check the 3.3 V rail before fitting the sensor.', // 13
];
const base = baseLines.map((line) => `${line}\n`).join('');

/** The write-up with lines replaced (1-based); `null` deletes a line, an array replaces it by several. */
function edit(changes: Record<number, string | string[] | null>): string {
  return baseLines
    .flatMap((line, index) => {
      const change = changes[index + 1];
      if (change === undefined) return [line];
      if (change === null) return [];
      return Array.isArray(change) ? change : [change];
    })
    .map((line) => `${line}\n`)
    .join('');
}

const stableTop = baseLines
  .slice(0, 6)
  .map((line) => `${line}\n`)
  .join('');
const stableBottom = baseLines
  .slice(8)
  .map((line) => `${line}\n`)
  .join('');

function generator(seed: number) {
  let state = seed >>> 0;
  const next = () => {
    state = (Math.imul(state, 1664525) + 1013904223) >>> 0;
    return state / 2 ** 32;
  };
  return { int: (n: number) => Math.floor(next() * n), bool: () => next() < 0.5 };
}

describe('mergeText', () => {
  it('merges an edit at the top and an edit at the bottom cleanly', () => {
    const ours = edit({ 1: '# Tidewatch: a solar tide logger' });
    const theirs = edit({ 13: '2. Check the 3.3 V rail, then fit the sensor.' });
    expect(mergeText(base, ours, theirs)).toEqual({
      clean: true,
      text: [
        '# Tidewatch: a solar tide logger',
        '',
        'Tidewatch logs the water level every ten minutes.',
        '',
        '## Power',
        '',
        'A 2 W panel charges one 18650 cell.',
        'The 3.3 V LDO runs warm at 300 mA.',
        '',
        '## Assembly',
        '',
        '1. Solder the charger and the LDO first.',
        '2. Check the 3.3 V rail, then fit the sensor.',
        '',
      ].join('\n'),
    });
  });

  it('reports edits to two adjacent lines as one conflict covering both lines', () => {
    const ours = edit({ 7: 'A 5 W panel charges one 18650 cell.' });
    const theirs = edit({ 8: 'The 3.3 V LDO runs hot at 300 mA.' });
    expect(mergeText(base, ours, theirs)).toEqual({
      clean: false,
      chunks: [
        { kind: 'stable', text: stableTop },
        {
          kind: 'conflict',
          id: 'conflict-1',
          ours: 'A 5 W panel charges one 18650 cell.\nThe 3.3 V LDO runs warm at 300 mA.\n',
          base: 'A 2 W panel charges one 18650 cell.\nThe 3.3 V LDO runs warm at 300 mA.\n',
          theirs: 'A 2 W panel charges one 18650 cell.\nThe 3.3 V LDO runs hot at 300 mA.\n',
          lines: { ours: 7, base: 7, theirs: 7 },
        },
        { kind: 'stable', text: stableBottom },
      ],
    });
  });

  it('reports the same edit plus an extra line next to it on one side as a conflict, as diff3 regions do', () => {
    const ours = edit({ 13: '2. Check the rail.' });
    const theirs = edit({ 13: ['2. Check the rail.', '3. Close the lid.'] });
    expect(mergeText(base, ours, theirs)).toEqual({
      clean: false,
      chunks: [
        {
          kind: 'stable',
          text: baseLines
            .slice(0, 12)
            .map((line) => `${line}\n`)
            .join(''),
        },
        {
          kind: 'conflict',
          id: 'conflict-1',
          ours: '2. Check the rail.\n',
          base: '2. Check the 3.3 V rail before fitting the sensor.\n',
          theirs: '2. Check the rail.\n3. Close the lid.\n',
          lines: { ours: 13, base: 13, theirs: 13 },
        },
      ],
    });
  });

  it('merges edits separated by one unchanged line cleanly', () => {
    const ours = edit({ 3: 'Tidewatch logs the water level every five minutes.' });
    const theirs = edit({ 5: '## Power and charging' });
    expect(mergeText(base, ours, theirs)).toEqual({
      clean: true,
      text: edit({ 3: 'Tidewatch logs the water level every five minutes.', 5: '## Power and charging' }),
    });
  });

  it('takes the same edit made on both sides once, without a conflict', () => {
    const both = edit({ 8: 'The 3.3 V LDO runs hot at 300 mA.' });
    expect(mergeText(base, both, both)).toEqual({ clean: true, text: both });

    const ours = edit({ 1: '# Tidewatch', 8: 'The 3.3 V LDO runs hot at 300 mA.' });
    const theirs = edit({ 8: 'The 3.3 V LDO runs hot at 300 mA.', 13: '2. Check the rail.' });
    expect(mergeText(base, ours, theirs)).toEqual({
      clean: true,
      text: edit({ 1: '# Tidewatch', 8: 'The 3.3 V LDO runs hot at 300 mA.', 13: '2. Check the rail.' }),
    });
  });

  it('reports different insertions at the same place as a conflict with an empty base', () => {
    const ours = edit({ 8: ['The 3.3 V LDO runs warm at 300 mA.', 'Fit a heatsink pad under U3.'] });
    const theirs = edit({ 8: ['The 3.3 V LDO runs warm at 300 mA.', 'Measured idle draw: 1.2 mA.'] });
    const result = mergeText(base, ours, theirs);
    expect(result.clean).toBe(false);
    if (result.clean) return;
    expect(result.chunks.filter((chunk) => chunk.kind === 'conflict')).toEqual([
      {
        kind: 'conflict',
        id: 'conflict-1',
        ours: 'Fit a heatsink pad under U3.\n',
        base: '',
        theirs: 'Measured idle draw: 1.2 mA.\n',
        lines: { ours: 9, base: 9, theirs: 9 },
      },
    ]);
  });

  it('takes the same insertion made on both sides once', () => {
    const both = edit({ 8: ['The 3.3 V LDO runs warm at 300 mA.', 'Fit a heatsink pad under U3.'] });
    const theirs = edit({
      1: '# Tidewatch',
      8: ['The 3.3 V LDO runs warm at 300 mA.', 'Fit a heatsink pad under U3.'],
    });
    expect(mergeText(base, both, theirs)).toEqual({
      clean: true,
      text: edit({ 1: '# Tidewatch', 8: ['The 3.3 V LDO runs warm at 300 mA.', 'Fit a heatsink pad under U3.'] }),
    });
  });

  it('reports deleting a line that the other side edited as a conflict', () => {
    const ours = edit({ 8: null });
    const theirs = edit({ 8: 'The 3.3 V LDO runs hot at 300 mA.' });
    expect(mergeText(base, ours, theirs)).toEqual({
      clean: false,
      chunks: [
        {
          kind: 'stable',
          text: baseLines
            .slice(0, 7)
            .map((line) => `${line}\n`)
            .join(''),
        },
        {
          kind: 'conflict',
          id: 'conflict-1',
          ours: '',
          base: 'The 3.3 V LDO runs warm at 300 mA.\n',
          theirs: 'The 3.3 V LDO runs hot at 300 mA.\n',
          lines: { ours: 8, base: 8, theirs: 8 },
        },
        { kind: 'stable', text: stableBottom },
      ],
    });
  });

  it('merges documents whose lines are named like object members (constructor, __proto__, toString)', () => {
    const members = 'constructor\n__proto__\ntoString\nhasOwnProperty\nprototype\nvalueOf\n__proto__\n';
    const ours = 'constructor()\n__proto__\ntoString\nhasOwnProperty\nprototype\nvalueOf\n__proto__\n';
    const theirs = 'constructor\n__proto__\ntoString\nhasOwnProperty\nprototype\nvalueOf\n__proto__\ntoString\n';
    expect(mergeText(members, ours, theirs)).toEqual({
      clean: true,
      text: 'constructor()\n__proto__\ntoString\nhasOwnProperty\nprototype\nvalueOf\n__proto__\ntoString\n',
    });

    const oursClash = 'constructor\nhasOwnProperty\ntoString\nhasOwnProperty\nprototype\nvalueOf\n__proto__\n';
    const theirsClash = 'constructor\nprototype\ntoString\nhasOwnProperty\nprototype\nvalueOf\n__proto__\n';
    expect(mergeText(members, oursClash, theirsClash)).toEqual({
      clean: false,
      chunks: [
        { kind: 'stable', text: 'constructor\n' },
        {
          kind: 'conflict',
          id: 'conflict-1',
          ours: 'hasOwnProperty\n',
          base: '__proto__\n',
          theirs: 'prototype\n',
          lines: { ours: 2, base: 2, theirs: 2 },
        },
        { kind: 'stable', text: 'toString\nhasOwnProperty\nprototype\nvalueOf\n__proto__\n' },
      ],
    });
  });

  describe('final line break', () => {
    it('keeps a document without a final line break without one', () => {
      expect(mergeText('a\nb\nc', 'A\nb\nc', 'a\nb\nC')).toEqual({ clean: true, text: 'A\nb\nC' });
    });

    it('keeps a document with a final line break with it', () => {
      expect(mergeText('a\nb\nc\n', 'A\nb\nc\n', 'a\nb\nC\n')).toEqual({ clean: true, text: 'A\nb\nC\n' });
    });

    it('follows the side that added or removed the final line break', () => {
      expect(mergeText('a\nb\nc\n', 'A\nb\nc', 'a\nb\nC\n')).toEqual({ clean: true, text: 'A\nb\nC' });
      expect(mergeText('a\nb\nc', 'A\nb\nc', 'a\nb\nC\n')).toEqual({ clean: true, text: 'A\nb\nC\n' });
    });

    it('returns the other side byte for byte when one side is unchanged', () => {
      expect(mergeText('x\n', 'x\n', 'y\r\nz')).toEqual({ clean: true, text: 'y\r\nz' });
      expect(mergeText('x\n', 'y\r\n\r\nz', 'x\n')).toEqual({ clean: true, text: 'y\r\n\r\nz' });
    });

    it('lets each side of a conflict at the end keep its own ending', () => {
      const result = mergeText('a\nb\nc', 'a\nb\nX', 'a\nb\nY\n');
      expect(result).toEqual({
        clean: false,
        chunks: [
          { kind: 'stable', text: 'a\nb\n' },
          {
            kind: 'conflict',
            id: 'conflict-1',
            ours: 'X',
            base: 'c',
            theirs: 'Y\n',
            lines: { ours: 3, base: 3, theirs: 3 },
          },
        ],
      });
      if (result.clean) return;
      expect(resolveChunks(result.chunks, { 'conflict-1': 'ours' })).toBe('a\nb\nX');
      expect(resolveChunks(result.chunks, { 'conflict-1': 'theirs' })).toBe('a\nb\nY\n');
      expect(resolveChunks(result.chunks, { 'conflict-1': 'both' })).toBe('a\nb\nX\nY\n');
    });
  });

  describe('line breaks', () => {
    it('sees CRLF and LF copies of a line as the same line', () => {
      const crlf = (text: string) => text.replaceAll('\n', '\r\n');
      const ours = crlf(edit({ 1: '# Tidewatch' }));
      const theirs = crlf(edit({ 13: '2. Check the rail.' }));
      expect(mergeText(crlf(base), ours, theirs)).toEqual({
        clean: true,
        text: crlf(edit({ 1: '# Tidewatch', 13: '2. Check the rail.' })),
      });
    });

    it("writes a merged text with the writer's line break when the sides differ", () => {
      expect(mergeText('a\nb\nc\n', 'A\r\nb\r\nc\r\n', 'a\nb\nC\n')).toEqual({ clean: true, text: 'A\r\nb\r\nC\r\n' });
    });
  });

  it('merges empty documents and whole-document insertions', () => {
    expect(mergeText('', '', '')).toEqual({ clean: true, text: '' });
    expect(mergeText('', '# Notes\n', '')).toEqual({ clean: true, text: '# Notes\n' });
    expect(mergeText('', '# Ours\n', '# Theirs\n')).toEqual({
      clean: false,
      chunks: [
        {
          kind: 'conflict',
          id: 'conflict-1',
          ours: '# Ours\n',
          base: '',
          theirs: '# Theirs\n',
          lines: { ours: 1, base: 1, theirs: 1 },
        },
      ],
    });
  });

  it('merges one random edit in each half cleanly and keeps both (property)', () => {
    const g = generator(2024);
    const lines = Array.from({ length: 14 }, (_, i) => `step ${i + 1}`);
    // Apply an edit to a copy of the lines: replace, insert before, or delete index `at`.
    const apply = (target: string[], at: number, kind: number, label: string) => {
      if (kind === 0) target.splice(at, 1, `${label} rewrote ${target[at]}`);
      else if (kind === 1) target.splice(at, 0, `${label} inserted`);
      else target.splice(at, 1);
    };
    for (let round = 0; round < 300; round++) {
      // Ours edits within lines 1–6, theirs within lines 9–14; lines 7 and 8 stay untouched between them.
      const oursKind = g.int(3);
      const oursAt = oursKind === 1 ? g.int(7) : g.int(6);
      const theirsKind = g.int(3);
      const theirsAt = 8 + (theirsKind === 1 ? g.int(7) : g.int(6));
      const finalBreak = g.bool();
      const text = (items: string[]) => items.join('\n') + (finalBreak ? '\n' : '');

      const ours = [...lines];
      apply(ours, oursAt, oursKind, 'ours');
      const theirs = [...lines];
      apply(theirs, theirsAt, theirsKind, 'theirs');
      // Theirs first: its edit sits at higher indices, so ours' index is still right afterwards.
      const expected = [...lines];
      apply(expected, theirsAt, theirsKind, 'theirs');
      apply(expected, oursAt, oursKind, 'ours');

      expect(mergeText(text(lines), text(ours), text(theirs))).toEqual({ clean: true, text: text(expected) });
      expect(mergeText(text(lines), text(theirs), text(ours))).toEqual({ clean: true, text: text(expected) });
    }
  });

  it('merges the same random edit made on both sides into that edit (property)', () => {
    const g = generator(99);
    const lines = Array.from({ length: 8 }, (_, i) => `check ${i + 1}`);
    for (let round = 0; round < 100; round++) {
      const edited = [...lines];
      const at = g.int(edited.length);
      if (g.bool()) edited.splice(at, 1, `check ${at + 1} passed`);
      else edited.splice(at, 1);
      const text = `${edited.join('\n')}\n`;
      // Theirs also adds a line at the far end from the shared edit, so the two regions do not touch.
      const theirs = at >= 4 ? ['added by theirs', ...edited] : [...edited, 'added by theirs'];
      const other = `${theirs.join('\n')}\n`;
      expect(mergeText(`${lines.join('\n')}\n`, text, other)).toEqual({ clean: true, text: other });
    }
  });
});

describe('resolveChunks', () => {
  // Two conflicts: both sides retitled the write-up, and both added a line after line 8.
  const ours = edit({ 1: '# Tidewatch v2', 8: ['The 3.3 V LDO runs warm at 300 mA.', 'Fit a heatsink pad under U3.'] });
  const theirs = edit({
    1: '# Tidewatch logger',
    8: ['The 3.3 V LDO runs warm at 300 mA.', 'Measured idle draw: 1.2 mA.'],
  });
  const merged = mergeText(base, ours, theirs);
  const chunks: MergeChunk[] = merged.clean ? [] : merged.chunks;
  const middle = baseLines
    .slice(1, 8)
    .map((line) => `${line}\n`)
    .join('');

  it('finds the two conflicts in document order', () => {
    expect(
      chunks.filter((chunk) => chunk.kind === 'conflict').map((chunk) => chunk.kind === 'conflict' && chunk.id),
    ).toEqual(['conflict-1', 'conflict-2']);
  });

  it('rebuilds the text from ours, theirs, both and a hand-edited text', () => {
    const text = resolveChunks(chunks, {
      'conflict-1': { text: '# Tidewatch v2 logger\n' },
      'conflict-2': 'both',
    });
    expect(text).toBe(
      `# Tidewatch v2 logger\n${middle}Fit a heatsink pad under U3.\nMeasured idle draw: 1.2 mA.\n${stableBottom}`,
    );
    expect(resolveChunks(chunks, { 'conflict-1': 'ours', 'conflict-2': 'ours' })).toBe(ours);
    expect(resolveChunks(chunks, { 'conflict-1': 'theirs', 'conflict-2': 'theirs' })).toBe(theirs);
    expect(resolveChunks(chunks, { 'conflict-1': 'theirs', 'conflict-2': 'ours' })).toBe(
      `# Tidewatch logger\n${middle}Fit a heatsink pad under U3.\n${stableBottom}`,
    );
  });

  it('ends a hand-edited text without a line break with one before the next line', () => {
    const text = resolveChunks(chunks, { 'conflict-1': { text: '# Tidewatch' }, 'conflict-2': { text: '' } });
    expect(text).toBe(`# Tidewatch\n${middle}${stableBottom}`);
  });

  it('refuses to rebuild while a conflict has no choice, naming it', () => {
    expect(() => resolveChunks(chunks, { 'conflict-1': 'ours' })).toThrow(UnresolvedConflictsError);
    try {
      resolveChunks(chunks, { 'conflict-1': 'ours' });
    } catch (error) {
      expect(error).toBeInstanceOf(UnresolvedConflictsError);
      expect((error as UnresolvedConflictsError).missing).toEqual(['conflict-2']);
    }
    expect(() => resolveChunks(chunks, {})).toThrow('No choice was made for conflicts conflict-1, conflict-2');
  });

  it('does not take a choice from the prototype of the choices object', () => {
    const choices = Object.create({ 'conflict-1': 'ours', 'conflict-2': 'ours' }) as Record<string, 'ours'>;
    expect(() => resolveChunks(chunks, choices)).toThrow(UnresolvedConflictsError);
  });

  it('parses choices from a resolution form with the shared schema', () => {
    expect(conflictChoicesSchema.parse({ 'conflict-1': 'theirs', 'conflict-2': { text: 'x' } })).toEqual({
      'conflict-1': 'theirs',
      'conflict-2': { text: 'x' },
    });
    expect(conflictChoicesSchema.safeParse({ 'conflict-1': 'mine' }).success).toBe(false);
    expect(conflictChoicesSchema.safeParse({ 'conflict-1': { text: 3 } }).success).toBe(false);
    expect(conflictChoicesSchema.safeParse({ 'conflict-1': { text: 'x', pick: 'ours' } }).success).toBe(false);
  });
});

describe('mergeFields', () => {
  interface Erratum {
    title: string;
    severity: string;
    status: string;
    symptom: string;
    workaround: string;
    boardsBuilt: number;
    affectedRevisions: string[];
    fix?: string;
  }
  const erratum: Erratum = {
    title: 'Sense resistor footprint is 0603',
    severity: 'minor',
    status: 'open',
    symptom: 'The 0805 part from the BOM does not fit R7.',
    workaround: 'Tilt an 0805 part onto the pads.\n\nOr order the 0603 part instead.\n',
    boardsBuilt: 3,
    affectedRevisions: ['A', 'B'],
  };

  it('takes each side’s changes to different fields, merging lists as sets and text line by line', () => {
    const ours: Erratum = {
      ...erratum,
      title: 'R7 footprint is 0603, BOM says 0805',
      workaround: 'Tilt an 0805 part onto the pads and tack one end.\n\nOr order the 0603 part instead.\n',
      affectedRevisions: ['A', 'B', 'C'],
      fix: 'Footprint changed to 0805 in rev D.',
    };
    const theirs: Erratum = {
      ...erratum,
      severity: 'major',
      workaround: 'Tilt an 0805 part onto the pads.\n\nOr order the 0603 part (RC0603) instead.\n',
      affectedRevisions: ['B'],
    };
    expect(mergeFields(erratum, ours, theirs)).toEqual({
      clean: true,
      fields: {
        title: 'R7 footprint is 0603, BOM says 0805',
        severity: 'major',
        status: 'open',
        symptom: 'The 0805 part from the BOM does not fit R7.',
        workaround: 'Tilt an 0805 part onto the pads and tack one end.\n\nOr order the 0603 part (RC0603) instead.\n',
        boardsBuilt: 3,
        affectedRevisions: ['B', 'C'],
        fix: 'Footprint changed to 0805 in rev D.',
      },
    });
  });

  it('reports a single-line field changed differently on both sides, keeping theirs until resolved', () => {
    const ours: Erratum = { ...erratum, status: 'workaround', severity: 'major' };
    const theirs: Erratum = { ...erratum, status: 'fixed_later', severity: 'major' };
    expect(mergeFields(erratum, ours, theirs)).toEqual({
      clean: false,
      fields: { ...erratum, status: 'fixed_later', severity: 'major' },
      conflicts: [
        {
          field: 'status',
          base: 'open',
          ours: 'workaround',
          theirs: 'fixed_later',
          chunks: [
            {
              kind: 'conflict',
              id: 'conflict-1',
              ours: 'workaround',
              base: 'open',
              theirs: 'fixed_later',
              lines: { ours: 1, base: 1, theirs: 1 },
            },
          ],
        },
      ],
    });
  });

  it('reports both sides editing the same paragraph of a text field, with the clashing lines', () => {
    const ours: Erratum = { ...erratum, workaround: 'Tilt the part.\n\nOr order the 0603 part instead.\n' };
    const theirs: Erratum = { ...erratum, workaround: 'Bend the pads.\n\nOr order the 0603 part instead.\n' };
    const result = mergeFields(erratum, ours, theirs);
    expect(result.clean).toBe(false);
    if (result.clean) return;
    expect(result.conflicts).toEqual([
      {
        field: 'workaround',
        base: erratum.workaround,
        ours: ours.workaround,
        theirs: theirs.workaround,
        chunks: [
          {
            kind: 'conflict',
            id: 'conflict-1',
            ours: 'Tilt the part.\n',
            base: 'Tilt an 0805 part onto the pads.\n',
            theirs: 'Bend the pads.\n',
            lines: { ours: 1, base: 1, theirs: 1 },
          },
          { kind: 'stable', text: '\nOr order the 0603 part instead.\n' },
        ],
      },
    ]);
    expect(result.fields.workaround).toBe(theirs.workaround);
  });

  it('reports a number changed differently on both sides as a whole-value conflict', () => {
    const result = mergeFields(erratum, { ...erratum, boardsBuilt: 5 }, { ...erratum, boardsBuilt: 4 });
    expect(result).toEqual({
      clean: false,
      fields: { ...erratum, boardsBuilt: 4 },
      conflicts: [{ field: 'boardsBuilt', base: 3, ours: 5, theirs: 4 }],
    });
  });

  it('treats a list reordered on one side as unchanged and the same change on both sides as clean', () => {
    const ours: Erratum = { ...erratum, affectedRevisions: ['B', 'A'], title: 'Same new title' };
    const theirs: Erratum = { ...erratum, affectedRevisions: ['A', 'B', 'C'], title: 'Same new title' };
    expect(mergeFields(erratum, ours, theirs)).toEqual({
      clean: true,
      fields: { ...erratum, affectedRevisions: ['A', 'B', 'C'], title: 'Same new title' },
    });
  });

  it('keeps a field named __proto__ as plain data', () => {
    const read = (json: string) => JSON.parse(json) as Record<string, string>;
    const result = mergeFields(
      read('{"__proto__":"a","note":"x"}'),
      read('{"__proto__":"b","note":"x"}'),
      read('{"__proto__":"a","note":"y"}'),
    );
    expect(result.clean).toBe(true);
    expect(Object.getPrototypeOf(result.fields)).toBe(Object.prototype);
    expect(Object.getOwnPropertyDescriptor(result.fields, '__proto__')?.value).toBe('b');
    expect(result.fields.note).toBe('y');
  });
});
