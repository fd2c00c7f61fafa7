// @vitest-environment happy-dom
import { mount, type VueWrapper } from '@vue/test-utils';
import { afterEach, describe, expect, it } from 'vitest';
import { nextTick } from 'vue';
import { createVuetify } from 'vuetify';
import RevisionDiff from '@/components/history/RevisionDiff.vue';

/** happy-dom's handle for resizing the window. */
const viewport = (width: number) =>
  (
    window as unknown as { happyDOM: { setViewport(size: { width: number; height: number }): void } }
  ).happyDOM.setViewport({ width, height: 800 });

// An invented bench-supply write-up, before and after one save: line 3 reworded, line 4 dropped,
// a new last line.
const before = [
  '# Bench supply',
  '',
  'The LDO runs warm at 300 mA.',
  'Fit the heatsink before power-up.',
  'Check the 3.3 V rail.',
].join('\n');
const after = [
  '# Bench supply',
  '',
  'The LDO runs hot at 450 mA.',
  'Check the 3.3 V rail.',
  'Log the current draw.',
].join('\n');

interface DrawnLine {
  kind: string | undefined;
  old: string;
  new: string;
  text: string;
}

let wrapper: VueWrapper | null = null;

afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  viewport(1280);
});

function mountDiff(props: Partial<InstanceType<typeof RevisionDiff>['$props']> = {}) {
  wrapper = mount(RevisionDiff, {
    props: { oldText: before, newText: after, mode: 'inline', words: true, ...props },
    global: { plugins: [createVuetify()] },
  });
  return wrapper;
}

/** Each inline row as drawn: its kind, both line numbers and the exact text of the line. */
function inlineLines(w: VueWrapper): DrawnLine[] {
  return w.findAll('tbody tr').map((tr) => ({
    kind: tr.attributes('data-kind'),
    old: tr.find('[data-side="old"]').exists() ? tr.find('[data-side="old"]').text() : '',
    new: tr.find('[data-side="new"]').exists() ? tr.find('[data-side="new"]').text() : '',
    text: tr.find('.revision-diff__text').exists() ? (tr.find('.revision-diff__text').element.textContent ?? '') : '',
  }));
}

/** Each side-by-side row as drawn: its kind and, per side, "number:text" or "" when that side is empty. */
function sideRows(w: VueWrapper): { kind: string | undefined; old: string; new: string }[] {
  return w.findAll('tbody tr').map((tr) => {
    const side = (name: 'old' | 'new') => {
      const number = tr.find(`.revision-diff__number[data-side="${name}"]`);
      const text = tr.find(`.revision-diff__text[data-side="${name}"]`);
      return number.exists() ? `${number.text()}:${text.element.textContent ?? ''}` : '';
    };
    return { kind: tr.attributes('data-kind'), old: side('old'), new: side('new') };
  });
}

describe('RevisionDiff inline', () => {
  it('draws unchanged, changed, removed and added lines with both line numbers', () => {
    const w = mountDiff();
    expect(inlineLines(w)).toEqual([
      { kind: 'same', old: '1', new: '1', text: '# Bench supply' },
      { kind: 'same', old: '2', new: '2', text: '' },
      { kind: 'changed-removed', old: '3', new: '', text: 'The LDO runs warm at 300 mA.' },
      { kind: 'changed-added', old: '', new: '3', text: 'The LDO runs hot at 450 mA.' },
      { kind: 'removed', old: '4', new: '', text: 'Fit the heatsink before power-up.' },
      { kind: 'same', old: '5', new: '4', text: 'Check the 3.3 V rail.' },
      { kind: 'added', old: '', new: '5', text: 'Log the current draw.' },
    ]);
  });

  it('summarises the change in words', () => {
    expect(mountDiff().find('[data-testid="diff-summary"]').text()).toBe('1 line added, 1 removed, 1 changed');
  });

  it('marks added and removed lines with a sign and with words for screen readers', () => {
    const w = mountDiff();
    const removed = w.find('tr[data-kind="removed"] .revision-diff__marker');
    const added = w.find('tr[data-kind="added"] .revision-diff__marker');
    expect(removed.find('[aria-hidden="true"]').text()).toBe('\u2212');
    expect(removed.find('.sr-only').text()).toBe('removed line:');
    expect(added.find('[aria-hidden="true"]').text()).toBe('+');
    expect(added.find('.sr-only').text()).toBe('added line:');
    expect(w.find('tr[data-kind="same"] .sr-only').exists()).toBe(false);
  });

  it('highlights the changed words with <del> and <ins>, and only the plain lines when words are off', async () => {
    const w = mountDiff({ words: true });
    expect(w.findAll('del').map((d) => d.text())).toEqual(['warm', '300']);
    expect(w.findAll('ins').map((i) => i.text())).toEqual(['hot', '450']);

    await w.setProps({ words: false });
    expect(w.findAll('del')).toHaveLength(0);
    expect(w.findAll('ins')).toHaveLength(0);
    // The lines themselves are still drawn whole.
    expect(w.find('tr[data-kind="changed-added"] .revision-diff__text').text()).toBe('The LDO runs hot at 450 mA.');

    await w.setProps({ words: true });
    expect(w.findAll('ins').map((i) => i.text())).toEqual(['hot', '450']);
  });

  it('says so when two revisions hold the same text', () => {
    const w = mountDiff({ oldText: 'one line', newText: 'one line' });
    expect(w.find('[data-testid="diff-summary"]').text()).toBe('No lines changed');
    expect(inlineLines(w)).toEqual([{ kind: 'same', old: '1', new: '1', text: 'one line' }]);
  });
});

describe('RevisionDiff side by side', () => {
  it('draws one row per line pair, with an empty cell opposite a removed or added line', () => {
    const w = mountDiff({ mode: 'side-by-side' });
    expect(w.attributes('data-mode')).toBe('side-by-side');
    expect(sideRows(w)).toEqual([
      { kind: 'same', old: '1:# Bench supply', new: '1:# Bench supply' },
      { kind: 'same', old: '2:', new: '2:' },
      { kind: 'changed', old: '3:The LDO runs warm at 300 mA.', new: '3:The LDO runs hot at 450 mA.' },
      { kind: 'removed', old: '4:Fit the heatsink before power-up.', new: '' },
      { kind: 'same', old: '5:Check the 3.3 V rail.', new: '4:Check the 3.3 V rail.' },
      { kind: 'added', old: '', new: '5:Log the current draw.' },
    ]);
  });

  it('puts removed words on the old side and added words on the new side', () => {
    const w = mountDiff({ mode: 'side-by-side' });
    const changed = w.find('tr[data-kind="changed"]');
    expect(changed.findAll('[data-side="old"] del').map((d) => d.text())).toEqual(['warm', '300']);
    expect(changed.findAll('[data-side="old"] ins')).toHaveLength(0);
    expect(changed.findAll('[data-side="new"] ins').map((i) => i.text())).toEqual(['hot', '450']);
    expect(changed.findAll('[data-side="new"] del')).toHaveLength(0);
  });

  it('falls back to inline on a narrow screen', async () => {
    viewport(480);
    window.dispatchEvent(new Event('resize'));
    const w = mountDiff({ mode: 'side-by-side' });
    await nextTick();
    expect(w.attributes('data-mode')).toBe('inline');
    expect(w.text()).toContain('Shown inline: the screen is too narrow for two columns.');
    expect(w.findAll('tbody tr')[2]!.attributes('data-kind')).toBe('changed-removed');
  });
});

describe('RevisionDiff folding', () => {
  // Twenty numbered steps; the tenth is reworded.
  const steps = Array.from({ length: 20 }, (_, i) => `Step ${i + 1}: solder joint ${i + 1}.`);
  const longBefore = steps.join('\n');
  const longAfter = steps.map((line, i) => (i === 9 ? 'Step 10: reflow joint 10.' : line)).join('\n');

  it('folds long unchanged runs, keeping three lines of context around the change', () => {
    const w = mountDiff({ oldText: longBefore, newText: longAfter });
    const kinds = w.findAll('tbody tr').map((tr) => tr.attributes('data-kind'));
    // Lines 1–6 folded, 7–9 shown, 10 changed, 11–13 shown, 14–20 folded.
    expect(kinds).toEqual([
      'skip',
      'same',
      'same',
      'same',
      'changed-removed',
      'changed-added',
      'same',
      'same',
      'same',
      'skip',
    ]);
    expect(w.findAll('.revision-diff__skip-button').map((b) => b.text())).toEqual([
      '6 unchanged lines — show',
      '7 unchanged lines — show',
    ]);
  });

  it('expands a folded run in place when its button is pressed', async () => {
    const w = mountDiff({ oldText: longBefore, newText: longAfter });
    await w.findAll('.revision-diff__skip-button')[0]!.trigger('click');
    const lines = inlineLines(w);
    expect(lines.slice(0, 7).map((l) => [l.kind, l.old, l.text])).toEqual([
      ['same', '1', 'Step 1: solder joint 1.'],
      ['same', '2', 'Step 2: solder joint 2.'],
      ['same', '3', 'Step 3: solder joint 3.'],
      ['same', '4', 'Step 4: solder joint 4.'],
      ['same', '5', 'Step 5: solder joint 5.'],
      ['same', '6', 'Step 6: solder joint 6.'],
      ['same', '7', 'Step 7: solder joint 7.'],
    ]);
    expect(w.findAll('.revision-diff__skip-button').map((b) => b.text())).toEqual(['7 unchanged lines — show']);
  });

  it('expands in place in the side-by-side view too', async () => {
    const w = mountDiff({ oldText: longBefore, newText: longAfter, mode: 'side-by-side' });
    expect(w.findAll('tbody tr')).toHaveLength(9);
    await w.findAll('.revision-diff__skip-button')[1]!.trigger('click');
    const rows = sideRows(w);
    expect(rows).toHaveLength(15);
    expect(rows[rows.length - 1]).toEqual({
      kind: 'same',
      old: '20:Step 20: solder joint 20.',
      new: '20:Step 20: solder joint 20.',
    });
  });

  it('honours a wider context', () => {
    const w = mountDiff({ oldText: longBefore, newText: longAfter, context: 5 });
    expect(w.findAll('.revision-diff__skip-button').map((b) => b.text())).toEqual([
      '4 unchanged lines — show',
      '5 unchanged lines — show',
    ]);
  });
});
