import { describe, expect, it } from 'vitest';
import {
  collapse,
  diffFields,
  diffLinesForView,
  diffStats,
  diffWords,
  partsForSide,
  splitLines,
  type DiffPart,
  type DiffRow,
  type ViewRow,
} from '../../../shared/diff';

// An invented build write-up, as a writer would save it.
const writeUp = [
  '# Tidewatch: a solar tide-gauge logger',
  '',
  'Tidewatch logs the water level every ten minutes from a pressure sensor.',
  '',
  '## Power',
  '',
  'A 2 W panel charges one 18650 cell through the charger IC.',
  'The 3.3 V LDO runs warm at 300 mA while the modem transmits.',
  '',
  '## Assembly',
  '',
  '1. Solder the charger and the LDO first.',
  '2. Check the 3.3 V rail before fitting the sensor.',
  '',
].join('\n');

function withLine(text: string, lineNumber: number, replacement: string): string {
  const lines = text.split('\n');
  lines[lineNumber - 1] = replacement;
  return lines.join('\n');
}

/** What an inline view draws: one line per entry, removed before added. */
function inline(rows: readonly ViewRow[]): string[] {
  const out: string[] = [];
  for (const row of rows) {
    if (row.kind === 'same') out.push(`  ${row.oldNumber} ${row.newNumber} ${row.oldText}`);
    else if (row.kind === 'removed') out.push(`- ${row.oldNumber} . ${row.oldText}`);
    else if (row.kind === 'added') out.push(`+ . ${row.newNumber} ${row.newText}`);
    else if (row.kind === 'changed') {
      out.push(`- ${row.oldNumber} . ${render(row.oldParts)}`);
      out.push(`+ . ${row.newNumber} ${render(row.newParts)}`);
    } else out.push(`… ${row.count} unchanged from ${row.oldNumber}/${row.newNumber}`);
  }
  return out;
}

/** What a side-by-side view draws: one entry per row, old cell | new cell. */
function sideBySide(rows: readonly DiffRow[]): [string, string][] {
  return rows.map((row) => {
    switch (row.kind) {
      case 'same':
        return [`${row.oldNumber} ${row.oldText}`, `${row.newNumber} ${row.newText}`];
      case 'removed':
        return [`${row.oldNumber} ${row.oldText}`, ''];
      case 'added':
        return ['', `${row.newNumber} ${row.newText}`];
      case 'changed':
        return [`${row.oldNumber} ${render(row.oldParts)}`, `${row.newNumber} ${render(row.newParts)}`];
    }
  });
}

function render(parts: readonly DiffPart[]): string {
  return parts
    .map((p) => (p.kind === 'removed' ? `[-${p.text}-]` : p.kind === 'added' ? `{+${p.text}+}` : p.text))
    .join('');
}

// A small deterministic generator so property checks are repeatable.
function generator(seed: number) {
  let state = seed >>> 0;
  const next = () => {
    state = (Math.imul(state, 1664525) + 1013904223) >>> 0;
    return state / 2 ** 32;
  };
  return {
    int: (n: number) => Math.floor(next() * n),
    pick: <T>(items: readonly T[]) => items[Math.floor(next() * items.length)]!,
  };
}

describe('splitLines', () => {
  it('treats CRLF and LF alike and does not invent a trailing empty line', () => {
    expect(splitLines('a\r\nb\nc\r\n')).toEqual(['a', 'b', 'c']);
    expect(splitLines('a\nb')).toEqual(['a', 'b']);
    expect(splitLines('')).toEqual([]);
    expect(splitLines('\n')).toEqual(['']);
    expect(splitLines('a\n\n')).toEqual(['a', '']);
  });

  it('keeps a lone carriage return inside its line rather than breaking there', () => {
    expect(splitLines('12 V\rsupply\n')).toEqual(['12 V\rsupply']);
  });
});

describe('diffLinesForView', () => {
  it('shows an unchanged write-up as numbered same rows', () => {
    const rows = diffLinesForView('# Title\n\nBody\n', '# Title\n\nBody\n');
    expect(rows).toEqual([
      { kind: 'same', oldNumber: 1, newNumber: 1, oldText: '# Title', newText: '# Title' },
      { kind: 'same', oldNumber: 2, newNumber: 2, oldText: '', newText: '' },
      { kind: 'same', oldNumber: 3, newNumber: 3, oldText: 'Body', newText: 'Body' },
    ]);
  });

  it('pairs an edited line as a changed row with word parts on each side', () => {
    const edited = withLine(writeUp, 8, 'The 3.3 V LDO runs hot at 450 mA while the modem transmits.');
    const changed = diffLinesForView(writeUp, edited).filter((row) => row.kind !== 'same');
    expect(changed).toEqual([
      {
        kind: 'changed',
        oldNumber: 8,
        newNumber: 8,
        oldText: 'The 3.3 V LDO runs warm at 300 mA while the modem transmits.',
        newText: 'The 3.3 V LDO runs hot at 450 mA while the modem transmits.',
        oldParts: [
          { text: 'The 3.3 V LDO runs ', kind: 'same' },
          { text: 'warm', kind: 'removed' },
          { text: ' at ', kind: 'same' },
          { text: '300', kind: 'removed' },
          { text: ' mA while the modem transmits.', kind: 'same' },
        ],
        newParts: [
          { text: 'The 3.3 V LDO runs ', kind: 'same' },
          { text: 'hot', kind: 'added' },
          { text: ' at ', kind: 'same' },
          { text: '450', kind: 'added' },
          { text: ' mA while the modem transmits.', kind: 'same' },
        ],
      },
    ]);
  });

  it('numbers lines after an insertion on each side separately', () => {
    const old = 'one\ntwo\nthree\n';
    const rows = diffLinesForView(old, 'one\ninserted\ntwo\nthree\n');
    expect(inline(rows)).toEqual(['  1 1 one', '+ . 2 inserted', '  2 3 two', '  3 4 three']);
  });

  it('pairs an edited paragraph with its new wording when a paragraph is inserted above it', () => {
    const old = '## Power\n\nThe LDO runs warm at 300 mA.\n';
    const now = '## Power\n\nAdd a heatsink pad under U3.\nThe LDO runs hot at 300 mA.\n';
    expect(inline(diffLinesForView(old, now))).toEqual([
      '  1 1 ## Power',
      '  2 2 ',
      '+ . 3 Add a heatsink pad under U3.',
      '- 3 . The LDO runs [-warm-] at 300 mA.',
      '+ . 4 The LDO runs {+hot+} at 300 mA.',
    ]);
  });

  it('shows a line rewritten from scratch as removed plus added, not as a word diff', () => {
    const rows = diffLinesForView('Use a 10k pull-up on SDA.\n', 'Flash with the bootloader button held.\n');
    expect(rows).toEqual([
      { kind: 'removed', oldNumber: 1, oldText: 'Use a 10k pull-up on SDA.' },
      { kind: 'added', newNumber: 1, newText: 'Flash with the bootloader button held.' },
    ]);
  });

  it('lays the same rows out side by side, pairing changed lines on one row', () => {
    const old = '- Board: rev B\n- Sensor: 0-5 m\n- Storage: microSD\n';
    const now = '- Board: rev C\n- Storage: microSD\n- Clock: RV-3028\n';
    expect(sideBySide(diffLinesForView(old, now))).toEqual([
      ['1 - Board: rev [-B-]', '1 - Board: rev {+C+}'],
      ['2 - Sensor: 0-5 m', ''],
      ['3 - Storage: microSD', '2 - Storage: microSD'],
      ['', '3 - Clock: RV-3028'],
    ]);
  });

  it('sees no change between CRLF and LF copies of the same text', () => {
    const crlf = writeUp.replaceAll('\n', '\r\n');
    const rows = diffLinesForView(crlf, writeUp);
    expect(rows).toHaveLength(13);
    expect(rows.every((row) => row.kind === 'same')).toBe(true);
    expect(diffStats(rows)).toEqual({ added: 0, removed: 0, changed: 0 });
  });

  it('does not show a trailing empty line, with or without a final line break', () => {
    expect(inline(diffLinesForView('a\nb', 'a\nb\n'))).toEqual(['  1 1 a', '  2 2 b']);
    expect(inline(diffLinesForView('a\nb\n', 'a\nb\nc\n'))).toEqual(['  1 1 a', '  2 2 b', '+ . 3 c']);
  });

  it('handles empty documents on either side', () => {
    expect(diffLinesForView('', '')).toEqual([]);
    expect(diffLinesForView('', '# New build\n\nFirst notes.\n')).toEqual([
      { kind: 'added', newNumber: 1, newText: '# New build' },
      { kind: 'added', newNumber: 2, newText: '' },
      { kind: 'added', newNumber: 3, newText: 'First notes.' },
    ]);
    expect(diffLinesForView('Draft\n', '')).toEqual([{ kind: 'removed', oldNumber: 1, oldText: 'Draft' }]);
  });

  it('compares lines named like object members as plain text', () => {
    const rows = diffLinesForView('constructor\n__proto__\ntoString\n', 'constructor\nhasOwnProperty\ntoString\n');
    expect(inline(rows)).toEqual(['  1 1 constructor', '- 2 . __proto__', '+ . 2 hasOwnProperty', '  3 3 toString']);
  });

  it('shows a wholesale rewrite as one replaced block between the unchanged head and tail', () => {
    // 2,800 line edits: beyond the exact diff's budget, so the coarse fallback runs.
    const old = [
      '# Log',
      ...Array.from({ length: 700 }, (_, i) => `x${i}`),
      'middle',
      ...Array.from({ length: 700 }, (_, i) => `x${i + 700}`),
      'end',
    ];
    const now = [
      '# Log',
      ...Array.from({ length: 700 }, (_, i) => `y${i}`),
      'middle',
      ...Array.from({ length: 700 }, (_, i) => `y${i + 700}`),
      'end',
    ];
    const rows = diffLinesForView(old.join('\n'), now.join('\n'));
    expect(rows[0]).toEqual({ kind: 'same', oldNumber: 1, newNumber: 1, oldText: '# Log', newText: '# Log' });
    expect(rows.at(-1)).toEqual({ kind: 'same', oldNumber: 1403, newNumber: 1403, oldText: 'end', newText: 'end' });
    expect(rows.find((row) => row.kind === 'same' && row.oldText === 'middle')).toEqual({
      kind: 'same',
      oldNumber: 702,
      newNumber: 702,
      oldText: 'middle',
      newText: 'middle',
    });
    expect(diffStats(rows)).toEqual({ added: 1400, removed: 1400, changed: 0 });
    expect(rows.flatMap((row) => (row.kind === 'added' ? [] : [row.oldText]))).toEqual(old);
    expect(rows.flatMap((row) => (row.kind === 'removed' ? [] : [row.newText]))).toEqual(now);
  });

  it('rebuilds both documents exactly from the rows (random edits)', () => {
    const g = generator(7);
    const vocabulary = [
      '## Power',
      '',
      '- R3: 4.7k',
      'The LDO runs warm.',
      'The LDO runs hot.',
      '1. Solder U3 first.',
      '`SDA` on pin 5',
    ];
    for (let round = 0; round < 300; round++) {
      const make = () => Array.from({ length: g.int(9) }, () => g.pick(vocabulary));
      const oldLines = make();
      const newLines = make();
      // Every line ends with a break, so an empty last entry is a real (blank) line.
      const asText = (lines: string[]) => lines.map((line) => `${line}\n`).join('');
      const rows = diffLinesForView(asText(oldLines), asText(newLines));
      const oldSide: string[] = [];
      const newSide: string[] = [];
      for (const row of rows) {
        if (row.kind !== 'added') oldSide.push(row.oldText);
        if (row.kind !== 'removed') newSide.push(row.newText);
        if (row.kind === 'changed') {
          expect(row.oldParts.map((p) => p.text).join('')).toBe(row.oldText);
          expect(row.newParts.map((p) => p.text).join('')).toBe(row.newText);
        }
      }
      expect(oldSide).toEqual(oldLines);
      expect(newSide).toEqual(newLines);
    }
  });
});

describe('collapse', () => {
  const twenty = Array.from({ length: 20 }, (_, i) => `line ${i + 1}`);
  const old = twenty.join('\n');
  const now = twenty.map((line, i) => (i === 9 ? 'line ten' : line)).join('\n');

  it('folds long unchanged runs on both sides of a change, keeping three lines of context', () => {
    expect(inline(collapse(diffLinesForView(old, now)))).toEqual([
      '… 6 unchanged from 1/1',
      '  7 7 line 7',
      '  8 8 line 8',
      '  9 9 line 9',
      '- 10 . line [-10-]',
      '+ . 10 line {+ten+}',
      '  11 11 line 11',
      '  12 12 line 12',
      '  13 13 line 13',
      '… 7 unchanged from 14/14',
    ]);
  });

  it('keeps the folded rows so a view can expand them in place', () => {
    const rows = collapse(diffLinesForView(old, now), 3);
    const first = rows[0]!;
    expect(first.kind).toBe('skip');
    if (first.kind !== 'skip') return;
    expect(first.rows.map((row) => row.oldText)).toEqual(['line 1', 'line 2', 'line 3', 'line 4', 'line 5', 'line 6']);
  });

  it('does not fold a gap of a single line between two changes', () => {
    const lines = ['a', 'b', 'c', 'd', 'e', 'f', 'g', 'h', 'i'];
    const edited = ['a edited', 'b', 'c', 'd', 'e', 'f', 'g', 'h', 'i edited'];
    // With context 3, lines b..h (7 lines) leave exactly one hidden line (e): shown, not folded.
    const rows = collapse(diffLinesForView(lines.join('\n'), edited.join('\n')), 3);
    expect(rows.filter((row) => row.kind === 'skip')).toEqual([]);
    expect(rows).toHaveLength(9);
  });

  it('folds between two changes with the given context', () => {
    const lines = Array.from({ length: 12 }, (_, i) => `p${i + 1}`);
    const edited = lines.map((line, i) => (i === 0 || i === 11 ? `${line} edited` : line));
    expect(inline(collapse(diffLinesForView(lines.join('\n'), edited.join('\n')), 1))).toEqual([
      '- 1 . p1',
      '+ . 1 p1{+ edited+}',
      '  2 2 p2',
      '… 8 unchanged from 3/3',
      '  11 11 p11',
      '- 12 . p12',
      '+ . 12 p12{+ edited+}',
    ]);
  });

  it('folds a document with no changes into a single skip', () => {
    const rows = collapse(diffLinesForView(old, old));
    expect(rows).toHaveLength(1);
    expect(rows[0]).toMatchObject({ kind: 'skip', count: 20, oldNumber: 1, newNumber: 1 });
  });
});

describe('diffStats', () => {
  it('counts added, removed and changed rows, also after collapsing', () => {
    const old = '- Board: rev B\n- Sensor: 0-5 m\n- Storage: microSD\n';
    const now = '- Board: rev C\n- Storage: microSD\n- Clock: RV-3028\n- Antenna: u.FL\n';
    const rows = diffLinesForView(old, now);
    expect(diffStats(rows)).toEqual({ added: 2, removed: 1, changed: 1 });
    expect(diffStats(collapse(rows, 0))).toEqual({ added: 2, removed: 1, changed: 1 });
  });
});

describe('diffWords', () => {
  it('marks the changed words of a short field', () => {
    expect(diffWords('Brown-out at 3.0 V', 'Brown-out at 2.7 V')).toEqual([
      { text: 'Brown-out at ', kind: 'same' },
      { text: '3', kind: 'removed' },
      { text: '2', kind: 'added' },
      { text: '.', kind: 'same' },
      { text: '0', kind: 'removed' },
      { text: '7', kind: 'added' },
      { text: ' V', kind: 'same' },
    ]);
  });

  it('reads two neighbouring changed words as one phrase instead of word-space-word', () => {
    expect(diffWords('Runs warm at idle', 'Runs hot under idle')).toEqual([
      { text: 'Runs ', kind: 'same' },
      { text: 'warm at', kind: 'removed' },
      { text: 'hot under', kind: 'added' },
      { text: ' idle', kind: 'same' },
    ]);
  });

  it('returns one same part for equal text and no parts for two empty texts', () => {
    expect(diffWords('USB-C', 'USB-C')).toEqual([{ text: 'USB-C', kind: 'same' }]);
    expect(diffWords('', '')).toEqual([]);
    expect(diffWords('', 'New title')).toEqual([{ text: 'New title', kind: 'added' }]);
  });

  it('splits combined parts into what each column of a side-by-side view shows', () => {
    const parts = diffWords('Runs warm at idle', 'Runs hot under idle');
    expect(partsForSide(parts, 'old')).toEqual([
      { text: 'Runs ', kind: 'same' },
      { text: 'warm at', kind: 'removed' },
      { text: ' idle', kind: 'same' },
    ]);
    expect(partsForSide(parts, 'new')).toEqual([
      { text: 'Runs ', kind: 'same' },
      { text: 'hot under', kind: 'added' },
      { text: ' idle', kind: 'same' },
    ]);
  });

  it('rebuilds each side exactly, whitespace included (random texts)', () => {
    const g = generator(42);
    const tokens = ['3.3', 'V', ' ', '  ', '\n', 'LDO,', 'warm', '(U3)', '\t', 'pin'];
    for (let round = 0; round < 500; round++) {
      const make = () => Array.from({ length: g.int(10) }, () => g.pick(tokens)).join('');
      const before = make();
      const after = make();
      const parts = diffWords(before, after);
      expect(
        partsForSide(parts, 'old')
          .map((p) => p.text)
          .join(''),
      ).toBe(before);
      expect(
        partsForSide(parts, 'new')
          .map((p) => p.text)
          .join(''),
      ).toBe(after);
    }
  });
});

describe('diffFields', () => {
  interface ErratumFields {
    id: number;
    title: string;
    severity: string;
    status: string;
    symptom: string;
    workaround: string | null;
    affectedRevisions: string[];
    updatedAt: string;
  }
  const labels = {
    title: 'Title',
    severity: 'Severity',
    status: 'Status',
    symptom: 'Symptom',
    workaround: 'Workaround',
    affectedRevisions: 'Affected board revisions',
  } as const;
  const before: ErratumFields = {
    id: 12,
    title: 'Sense resistor footprint is 0603',
    severity: 'Minor',
    status: 'Open',
    symptom: 'The 0805 resistor from the BOM does not fit R7.',
    workaround: null,
    affectedRevisions: ['A', 'B'],
    updatedAt: '2024-03-01',
  };

  it('lists only changed fields, in label order, with word parts for text and set changes for lists', () => {
    const after: ErratumFields = {
      ...before,
      id: 99,
      title: 'Sense resistor footprint is 0402',
      severity: 'Major',
      workaround: '',
      affectedRevisions: ['B', 'C'],
      updatedAt: '2024-04-02',
    };
    expect(diffFields(before, after, labels)).toEqual([
      {
        field: 'title',
        label: 'Title',
        kind: 'text',
        before: 'Sense resistor footprint is 0603',
        after: 'Sense resistor footprint is 0402',
        parts: [
          { text: 'Sense resistor footprint is ', kind: 'same' },
          { text: '0603', kind: 'removed' },
          { text: '0402', kind: 'added' },
        ],
      },
      {
        field: 'severity',
        label: 'Severity',
        kind: 'text',
        before: 'Minor',
        after: 'Major',
        parts: [
          { text: 'Minor', kind: 'removed' },
          { text: 'Major', kind: 'added' },
        ],
      },
      {
        field: 'affectedRevisions',
        label: 'Affected board revisions',
        kind: 'set',
        before: ['A', 'B'],
        after: ['B', 'C'],
        added: ['C'],
        removed: ['A'],
      },
    ]);
  });

  it('treats a reordered list and a missing versus empty text as unchanged', () => {
    const after: ErratumFields = { ...before, workaround: '', affectedRevisions: ['B', 'A'] };
    expect(diffFields(before, after, labels)).toEqual([]);
  });

  it('shows a filled-in text as entirely added', () => {
    const after: ErratumFields = { ...before, workaround: 'Fit a 0603 part.' };
    expect(diffFields(before, after, labels)).toEqual([
      {
        field: 'workaround',
        label: 'Workaround',
        kind: 'text',
        before: '',
        after: 'Fit a 0603 part.',
        parts: [{ text: 'Fit a 0603 part.', kind: 'added' }],
      },
    ]);
  });

  it('shows numbers and flags as before and after values', () => {
    const changes = diffFields(
      { boards: 3, published: false },
      { boards: 5, published: true },
      { boards: 'Boards built', published: 'Published' },
    );
    expect(changes).toEqual([
      { field: 'boards', label: 'Boards built', kind: 'value', before: 3, after: 5 },
      { field: 'published', label: 'Published', kind: 'value', before: false, after: true },
    ]);
  });
});
