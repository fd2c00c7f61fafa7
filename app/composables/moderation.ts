/**
 * Typed access to flags, the moderation queue, hiding and restoring content, and the audit log.
 * Components call these, never fetch.
 */
import type {
  AuditList,
  AuditQuery,
  CreateFlag,
  Flag,
  FlagCreated,
  FlagQueue,
  FlagQueueQuery,
  FlagTargetKind,
  HiddenInfo,
  ModerationActionResult,
  ModerationTargetDetail,
} from '@shared/contracts/moderation';
import { ApiError, http } from './http';

const target = (kind: FlagTargetKind, id: number) => `/moderation/targets/${kind}/${id}`;

export const moderationApi = {
  flag: (input: CreateFlag) => http.post<FlagCreated>('/flags', input),
  queue: (query: FlagQueueQuery = {}) =>
    http.get<FlagQueue>('/moderation/flags', { query: { state: query.state, page: query.page as number | undefined } }),
  target: (kind: FlagTargetKind, id: number) => http.get<ModerationTargetDetail>(target(kind, id)),
  hide: (kind: FlagTargetKind, id: number, reason: string) =>
    http.post<ModerationActionResult>(`${target(kind, id)}/hide`, { reason }),
  restore: (kind: FlagTargetKind, id: number, reason: string) =>
    http.post<ModerationActionResult>(`${target(kind, id)}/restore`, { reason }),
  dismiss: (flagId: number, reason: string) => http.post<Flag>(`/moderation/flags/${flagId}/dismiss`, { reason }),
  audit: (query: AuditQuery = {}) =>
    http.get<AuditList>('/audit', { query: { ...query, page: query.page as number | undefined } }),
  auditFor: (kind: FlagTargetKind, id: number) => http.get<AuditList>(`/audit/for/${kind}/${id}`),
};

/** The public reason of a 410 `gone` answer (hidden by moderators), or null for any other error. */
export function hiddenInfoOf(error: unknown): HiddenInfo | null {
  if (!(error instanceof ApiError) || error.code !== 'gone') return null;
  const hidden = (error.details as { hidden?: Partial<HiddenInfo> } | undefined)?.hidden;
  return {
    reason: typeof hidden?.reason === 'string' ? hidden.reason : '',
    at: typeof hidden?.at === 'string' ? hidden.at : '',
  };
}
