import type { Flag } from '../../shared/contracts/moderation';
import type { FlagRow } from './queries';

export function toFlag(row: FlagRow): Flag {
  return {
    id: row.id,
    targetKind: row.targetKind as Flag['targetKind'],
    targetId: row.targetId,
    reason: row.reason,
    text: row.text,
    state: row.state,
    createdAt: row.createdAt.toISOString(),
    handledAt: row.handledAt?.toISOString() ?? null,
  };
}
