/** What a moderator can do to a tag, and how the result reads afterwards. */
import type { TagCurationResult } from '@shared/contracts/tags';
import { describeCounts } from '@/composables/tag-pages';

export type TagCurationAction = 'approve' | 'reject' | 'edit' | 'merge' | 'unmerge' | 'deprecate' | 'undeprecate';

/** The sentence shown after an action succeeded. `name` is the tag's name before the action. */
export function describeCurationResult(action: TagCurationAction, name: string, result: TagCurationResult): string {
  const { lessons, errata, projects } = result.retagged;
  const moved = lessons + errata + projects > 0 ? describeCounts(result.retagged) : 'nothing';
  const n = `“${name}”`;
  switch (action) {
    case 'approve':
      return `${n} is approved.`;
    case 'undeprecate':
      return `${n} is approved again.`;
    case 'deprecate':
      return `${n} is deprecated.`;
    case 'edit':
      return `Saved: the tag is now “${result.tag.name}” (${result.tag.slug}).`;
    case 'merge':
      return `${n} was merged into “${result.mergedInto}”; moved: ${moved}. Its slug now leads there.`;
    case 'reject':
      return result.mergedInto
        ? `${n} was rejected and replaced with “${result.mergedInto}”; moved: ${moved}.`
        : `${n} was rejected and removed; taken off: ${moved}.`;
    case 'unmerge':
      return `${n} is a tag of its own again; it is back on: ${moved}.`;
  }
  return '';
}
