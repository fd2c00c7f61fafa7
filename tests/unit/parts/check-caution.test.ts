// @vitest-environment happy-dom
/** The caution every check shows: a labelled note, with the level-check wording naming measurement. */
import '../editor/vuetify-env';
import { mount } from '@vue/test-utils';
import { describe, expect, it } from 'vitest';
import { createVuetify } from 'vuetify';
import CheckCaution from '@/components/checks/CheckCaution.vue';

function mountCaution(props: Record<string, unknown> = {}) {
  return mount(CheckCaution, { props, global: { plugins: [createVuetify()] } });
}

describe('CheckCaution', () => {
  it('is a note named by its title and says it does not replace the datasheet', () => {
    const w = mountCaution();
    const note = w.get('[role="note"]');
    const titleId = note.attributes('aria-labelledby');
    expect(titleId).toBeTruthy();
    expect(w.get(`[id="${titleId}"]`).text()).toBe('About this check');
    expect(note.text()).toContain('does not replace reading the datasheet');
    expect(note.text()).not.toContain('measuring');
  });

  it('adds measuring the real circuit for level checks, and takes a custom text and label', () => {
    expect(mountCaution({ variant: 'level' }).text()).toContain('measuring the real circuit');
    const custom = mountCaution({ text: 'Only a sketch.', label: 'Pin map caution' });
    expect(custom.text()).toContain('Only a sketch.');
    expect(custom.text()).toContain('Pin map caution');
  });
});
