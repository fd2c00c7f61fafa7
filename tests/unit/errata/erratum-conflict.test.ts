// @vitest-environment happy-dom
/**
 * Settling a 409 on an erratum: value fields are a plain choice shown with board labels, the
 * rest comes from the server's merge, and the emitted fields are ready to save on top of the
 * revision stored now.
 */
import '../editor/vuetify-env';
import type { EditConflict } from '@shared/contracts/projects';
import { mount, type VueWrapper } from '@vue/test-utils';
import { afterEach, describe, expect, it } from 'vitest';
import { createVuetify } from 'vuetify';
import ErratumConflict from '@/components/errata/ErratumConflict.vue';
import { fieldsOfErratum } from '@/components/errata/fields';
import { boards, errata } from './fixtures';

// E1 as the writer edited it from revision 3: severity raised, Rev B added, cause rewritten.
const ours = { ...fieldsOfErratum(errata[0]!), severity: 'critical' as const, affected: [11, 12] };

const conflict: EditConflict = {
  baseRevision: 3,
  current: {
    revision: 4,
    fields: {},
    author: { id: 9, handle: 'tamsin-vell', displayName: 'Tamsin Vell', avatarUrl: null },
    createdAt: '2026-03-02T10:00:00.000Z',
  },
  chunks: {},
  fieldConflicts: [
    { field: 'severity', base: 'major', ours: 'critical', theirs: 'minor' },
    { field: 'affected', base: ['11'], ours: ['11', '12'], theirs: ['11', '13'] },
  ],
  merged: {
    title: 'Relay never switches on GPIO35',
    severity: 'major',
    affected: ['11'],
    cause: 'GPIO35 is input-only (datasheet table 4-3).',
    pins: ['GPIO35'],
  },
};

let wrapper: VueWrapper | null = null;
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
});

function mountConflict() {
  wrapper = mount(ErratumConflict, {
    props: { conflict, ours, names: { boards, categories: [] } },
    global: { plugins: [createVuetify()] },
    attachTo: document.body,
  });
  return wrapper;
}

function radio(w: VueWrapper, field: string, label: string) {
  const input = w
    .find(`[data-field="${field}"]`)
    .findAll('input[type="radio"]')
    .find((i) => (i.element.closest('.v-radio')?.textContent ?? '').startsWith(label));
  if (!input) throw new Error(`no "${label}" choice for ${field}`);
  return input;
}

describe('ErratumConflict', () => {
  it('shows both values as a reader knows them: words and board labels', () => {
    const w = mountConflict();
    const affected = w.find('[data-field="affected"]').text();
    expect(affected).toContain('Mine: Rev A, Rev B');
    expect(affected).toContain('Theirs (saved now): Rev A, Rev C');
    expect(affected).toContain('Before either change: Rev A');
    expect(w.find('[data-field="severity"]').text()).toContain('Theirs (saved now): Minor');
  });

  it('refuses to finish until every value field has a choice', async () => {
    const w = mountConflict();
    await radio(w, 'severity', 'Mine').setValue(true);
    await w
      .findAll('button')
      .find((b) => b.text() === 'Use these choices')!
      .trigger('click');
    expect(w.emitted('resolved')).toBeUndefined();
    expect(w.text()).toContain('Choose a value for each field above first.');
  });

  it('emits the chosen values, the merged rest and the stored revision as the new base', async () => {
    const w = mountConflict();
    await radio(w, 'severity', 'Theirs').setValue(true);
    await radio(w, 'affected', 'Mine').setValue(true);
    await w
      .findAll('button')
      .find((b) => b.text() === 'Use these choices')!
      .trigger('click');
    const [resolution] = w.emitted('resolved')![0] as [{ fields: Record<string, unknown>; baseRevision: number }];
    expect(resolution.baseRevision).toBe(4);
    expect(resolution.fields.severity).toBe('minor');
    expect(resolution.fields.affected).toEqual([11, 12]);
    expect(resolution.fields.title).toBe('Relay never switches on GPIO35');
    expect(resolution.fields.cause).toBe('GPIO35 is input-only (datasheet table 4-3).');
    // Untouched by either side: the writer's own value stays.
    expect(resolution.fields.workaround).toBe('Cut the trace and bodge Q2 to GPIO25.');
  });
});
