/**
 * The audit log's compact before/after: only fields that changed, each side short, and a tag entry
 * names its slug for the link.
 */
import { describe, expect, it } from 'vitest';
import { actionInWords, auditChanges, tagSlugOf } from '@/components/moderation/display';

describe('audit entry display', () => {
  it('lists only the fields that changed, objects as JSON, missing sides as a dash', () => {
    const before = { slug: 'read-only-gpio', name: 'read only gpio', state: 'pending', mergedInto: null };
    const after = {
      slug: 'read-only-gpio',
      name: 'read only gpio',
      state: 'pending',
      mergedInto: 'input-only-pin',
      moved: { lessons: [4] },
    };
    expect(auditChanges(before, after)).toEqual([
      { field: 'mergedInto', before: 'null', after: 'input-only-pin' },
      { field: 'moved', before: '—', after: '{"lessons":[4]}' },
    ]);
  });

  it('shortens a long value to 160 characters', () => {
    const [change] = auditChanges({ description: '' }, { description: 'x'.repeat(400) });
    expect(change!.after).toHaveLength(160);
    expect(change!.after.endsWith('…')).toBe(true);
  });

  it('finds the tag slug in the entry, the after side first, and words actions', () => {
    expect(tagSlugOf({ slug: 'old-name' }, { slug: 'new-name' })).toBe('new-name');
    expect(tagSlugOf({ slug: 'gone-tag' }, null)).toBe('gone-tag');
    expect(tagSlugOf(null, null)).toBeNull();
    expect(actionInWords('tag.merge')).toBe('merged a tag into another');
    expect(actionInWords('part.revise')).toBe('part revise');
  });
});
