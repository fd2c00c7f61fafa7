// @vitest-environment happy-dom
/**
 * Tags on lessons and errata: a chip says "pending review" for a tag awaiting a moderator, and a
 * name nobody has used yet counts as such a pending tag from the moment it is typed.
 */
import '../editor/vuetify-env';
import { mount } from '@vue/test-utils';
import { describe, expect, it } from 'vitest';
import { createVuetify } from 'vuetify';
import TagChip from '@/components/tags/TagChip.vue';
import { sameTag, tagStateOf } from '@/composables/tags';

const known = [
  { slug: 'input-only-pin', name: 'input-only pin', state: 'approved' as const },
  { slug: 'bodge-wire', name: 'bodge wire', state: 'pending' as const },
];

describe('tag states', () => {
  it('finds a known tag by name or slug, ignoring case and surrounding space', () => {
    expect(tagStateOf('  Input-Only Pin ', known).state).toBe('approved');
    expect(tagStateOf('bodge-wire', known)).toEqual(known[1]);
    expect(sameTag('Relay', ' relay ')).toBe(true);
  });

  it('treats a new name as a pending tag', () => {
    expect(tagStateOf('ground bounce ', known)).toEqual({ slug: '', name: 'ground bounce', state: 'pending' });
  });
});

describe('TagChip', () => {
  const render = (tag: (typeof known)[number] | { slug: string; name: string; state: 'deprecated' }) =>
    mount(TagChip, { props: { tag }, global: { plugins: [createVuetify()] } });

  it('marks a pending tag in words', () => {
    const w = render(known[1]!);
    expect(w.text()).toContain('bodge wire');
    expect(w.text()).toContain('pending review');
  });

  it('shows an approved tag by its name alone', () => {
    const w = render(known[0]!);
    expect(w.text().trim()).toBe('input-only pin');
  });

  it('says when a tag is deprecated', () => {
    expect(render({ slug: 'old', name: 'old tag', state: 'deprecated' }).text()).toContain('deprecated');
  });
});
