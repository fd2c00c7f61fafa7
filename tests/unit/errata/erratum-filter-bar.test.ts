// @vitest-environment happy-dom
/**
 * The errata filters as a reader works them: toggle chips that say whether they are on, typing
 * that is passed on once the reader pauses, and chip rows folded away on a phone.
 */
import '../editor/vuetify-env';
import { mount, type VueWrapper } from '@vue/test-utils';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { createVuetify } from 'vuetify';
import ErratumFilterBar from '@/components/errata/ErratumFilterBar.vue';
import { emptyFilters, type ErrataFilters } from '@/components/errata/filter';
import { boards } from './fixtures';

/** happy-dom's own control of the window size, which Vuetify's display reads. */
function setViewport(width: number, height: number) {
  (window as unknown as { happyDOM: { setViewport(s: { width: number; height: number }): void } }).happyDOM.setViewport(
    { width, height },
  );
}

let wrapper: VueWrapper | null = null;
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  vi.useRealTimers();
  setViewport(1280, 800);
});

function mountBar(filters: Partial<ErrataFilters> = {}) {
  wrapper = mount(ErratumFilterBar, {
    props: {
      filters: { ...emptyFilters(), ...filters },
      boards,
      categories: [
        { slug: 'power', name: 'Power' },
        { slug: 'firmware', name: 'Firmware' },
      ],
    },
    global: { plugins: [createVuetify()] },
    attachTo: document.body,
  });
  return wrapper;
}

const chip = (w: VueWrapper, group: string, value: string) =>
  w
    .findAll('[role="group"]')
    .find((g) => g.text().startsWith(group))!
    .get(`button[data-value="${value}"]`);

describe('ErratumFilterBar', () => {
  it('adds a status to the chosen ones when its chip is pressed', async () => {
    const w = mountBar({ statuses: ['workaround'] });
    expect(chip(w, 'Status', 'workaround').attributes('aria-pressed')).toBe('true');
    expect(chip(w, 'Status', 'open').attributes('aria-pressed')).toBe('false');
    await chip(w, 'Status', 'open').trigger('click');
    expect(w.emitted('update')).toEqual([[{ statuses: ['workaround', 'open'] }]]);
  });

  it('takes a chosen chip away when pressed again', async () => {
    const w = mountBar({ categories: ['power', 'firmware'] });
    await chip(w, 'Category', 'power').trigger('click');
    expect(w.emitted('update')).toEqual([[{ categories: ['firmware'] }]]);
  });

  it('passes typed words on once the reader pauses, not with every key', async () => {
    vi.useFakeTimers();
    const w = mountBar();
    const input = w.get('[data-testid="errata-text"] input');
    await input.setValue('relay');
    await input.setValue('relay K1');
    expect(w.emitted('update')).toBeUndefined();
    vi.advanceTimersByTime(300);
    expect(w.emitted('update')).toEqual([[{ text: 'relay K1' }]]);
  });

  it('offers to clear only when something is filtered', async () => {
    expect(mountBar().text()).not.toContain('Clear all filters');
    wrapper!.unmount();
    const w = mountBar({ myBoard: 11 });
    const clear = w.findAll('button').find((b) => b.text() === 'Clear all filters')!;
    await clear.trigger('click');
    expect(w.emitted('clear')).toHaveLength(1);
  });

  it('folds the chip rows behind "More filters" on a phone, saying how many are chosen', () => {
    setViewport(390, 844);
    const w = mountBar({ severities: ['critical', 'major'] });
    const details = w.get('details').element as HTMLDetailsElement;
    expect(w.get('summary').text()).toBe('More filters (2 chosen)');
    // Something is chosen, so the rows start open; with nothing chosen they start folded.
    expect(details.open).toBe(true);
    w.unmount();
    const plain = mountBar();
    expect((plain.get('details').element as HTMLDetailsElement).open).toBe(false);
  });
});
