/**
 * How every read path treats content a moderator hid (shared/contracts/moderation.ts, header):
 * the people responsible for it and the moderators still see it, marked with the public reason;
 * everyone else is told it was hidden (410 with the reason) or does not see it in lists.
 */
import type { HiddenInfo } from '../../shared/contracts/moderation';
import type { ProjectRole } from '../../shared/domain';
import { AppError } from '../http/errors';
import type { AuthUser } from '../http/routes';

export interface Hideable {
  hiddenAt: Date | null;
  hiddenReason: string | null;
}

/** Who is reading: their site role and id, and their role on the project the content is in. */
export interface Reader {
  user: Pick<AuthUser, 'id' | 'role'> | null;
  projectRole: ProjectRole | null;
}

export function isModerator(user: Pick<AuthUser, 'role'> | null | undefined): boolean {
  return user?.role === 'moderator' || user?.role === 'admin';
}

/**
 * Whether the reader still sees hidden content. `by` says who answers for it: the project's
 * owner and editors (`project`, the default: project pages, documents, errata, lessons, photos)
 * or only its author (`author`: comments and proposals, which members write on others' projects).
 */
export function seesHidden(
  reader: Reader,
  by: { authorId?: number | null; only?: 'project' | 'author' } = {},
): boolean {
  if (isModerator(reader.user)) return true;
  if (reader.user && by.authorId != null && reader.user.id === by.authorId) return true;
  return (by.only ?? 'project') === 'project' && reader.projectRole !== null;
}

export function hiddenOf(row: Hideable): HiddenInfo | null {
  return row.hiddenAt ? { reason: row.hiddenReason ?? '', at: row.hiddenAt.toISOString() } : null;
}

export function hiddenError(what: string, row: Hideable): AppError {
  return new AppError('gone', `${what} was hidden by the moderators.`, { hidden: hiddenOf(row) });
}

/** Throws 410 with the reason when the row is hidden and the reader may not see it. */
export function refuseHidden(
  row: Hideable,
  reader: Reader,
  what: string,
  by: { authorId?: number | null; only?: 'project' | 'author' } = {},
): void {
  if (row.hiddenAt && !seesHidden(reader, by)) throw hiddenError(what, row);
}
