/**
 * Words for the audit log and the moderation screens: actions as sentences, target kinds as nouns,
 * and a compact before/after of the JSON an audit entry keeps.
 */
import { flagTargetKindLabels, flagTargetKinds, type FlagTargetKind } from '@shared/contracts/moderation';

const actionWords: Record<string, string> = {
  'content.hide': 'hid content',
  'content.restore': 'restored content',
  'flag.dismiss': 'dismissed a flag',
  'tag.approve': 'approved a tag',
  'tag.reject': 'rejected a tag',
  'tag.edit': 'edited a tag',
  'tag.merge': 'merged a tag into another',
  'tag.unmerge': 'unmerged a tag',
  'tag.deprecate': 'deprecated a tag',
  'tag.undeprecate': 'undeprecated a tag',
  'user.role': "changed a member's role",
  'user.suspend': 'suspended a member',
  'user.unsuspend': 'reinstated a member',
  'project.delete': 'deleted a project',
  'project.restore': 'restored a project',
};

/** "merged a tag into another"; an action we have no words for reads as its parts ("part revise"). */
export function actionInWords(action: string): string {
  return actionWords[action] ?? action.replace(/[._]/g, ' ');
}

/** Actions offered in the audit log's filter (any other still shows, and can be searched for). */
export const auditActionItems = Object.entries(actionWords).map(([value, title]) => ({ value, title }));

export function isFlagTargetKind(kind: string): kind is FlagTargetKind {
  return (flagTargetKinds as readonly string[]).includes(kind);
}

export function targetKindInWords(kind: string): string {
  if (kind === 'tag') return 'Tag';
  if (kind === 'user') return 'Member';
  return isFlagTargetKind(kind) ? flagTargetKindLabels[kind] : kind;
}

export const auditTargetKindItems = [
  { value: 'tag', title: 'Tag' },
  { value: 'user', title: 'Member' },
  ...flagTargetKinds.map((value) => ({ value, title: flagTargetKindLabels[value] })),
];

export interface AuditFieldChange {
  field: string;
  before: string;
  after: string;
}

const MAX_VALUE = 160;

function show(value: unknown): string {
  if (value === undefined) return '—';
  const text = typeof value === 'string' ? value : JSON.stringify(value);
  return text.length > MAX_VALUE ? `${text.slice(0, MAX_VALUE - 1)}…` : text;
}

function asRecord(value: unknown): Record<string, unknown> {
  if (value && typeof value === 'object' && !Array.isArray(value)) return value as Record<string, unknown>;
  return value === null || value === undefined ? {} : { value };
}

/**
 * The top-level fields that differ between `before` and `after`, in first-seen order, with each side
 * as short text. Fields that did not change stay out, so a rename shows just the name (and slug).
 */
export function auditChanges(before: unknown, after: unknown): AuditFieldChange[] {
  const a = asRecord(before);
  const b = asRecord(after);
  const fields = [...new Set([...Object.keys(a), ...Object.keys(b)])];
  return fields
    .filter((field) => JSON.stringify(a[field]) !== JSON.stringify(b[field]))
    .map((field) => ({ field, before: show(a[field]), after: show(b[field]) }));
}

/** The slug a tag's audit entry names (its snapshot keeps it), for a link to the tag page. */
export function tagSlugOf(before: unknown, after: unknown): string | null {
  for (const side of [after, before]) {
    const slug = asRecord(side).slug;
    if (typeof slug === 'string' && slug) return slug;
  }
  return null;
}

export type ModerationAction = 'hide' | 'restore' | 'dismiss';
