/** Who hears about errata: followers of the project, and everyone in an erratum's thread. */
import type { Comment, ErratumDetail, NotificationPayload } from '../../shared/contracts/errata';
import type { Tx } from '../../db/client';
import { excerptOf, insertComment, threadParticipants } from '../comments/service';
import type { AppContext } from '../context';
import type { AuthUser } from '../http/routes';
import { followerIds, notify, projectMemberIds, withNotifications } from '../notifications/service';
import type { ProjectRow } from '../projects/queries';
import type { ErratumRow } from './queries';

const erratumPath = (project: ProjectRow, number: number) => `/projects/${project.slug}/errata/E${number}`;

/** In the transaction that created the erratum: notify the project's followers (ids returned). */
export async function notifyNewErratum(
  tx: Tx,
  project: ProjectRow,
  actor: AuthUser,
  row: ErratumRow,
): Promise<number[]> {
  if (project.status !== 'published') return [];
  const payload: NotificationPayload = {
    projectSlug: project.slug,
    projectTitle: project.title,
    actor: { handle: actor.handle, displayName: actor.displayName },
    erratumNumber: row.number,
    erratumTitle: row.title,
    path: erratumPath(project, row.number),
  };
  return notify(tx, await followerIds(tx, project.id), 'new_erratum', payload, actor.id);
}

export async function commentOnErratum(
  ctx: AppContext,
  project: ProjectRow,
  user: AuthUser,
  erratum: ErratumDetail,
  body: string,
): Promise<Comment> {
  return withNotifications(ctx, async (tx, collect) => {
    const created = await insertComment(tx, { erratumId: erratum.id }, project.id, user, body);
    const recipients = [
      ...(await threadParticipants(tx, { erratumId: erratum.id })),
      ...(await projectMemberIds(tx, project.id)),
      ...(erratum.reportedBy ? [erratum.reportedBy.id] : []),
    ];
    collect(
      await notify(
        tx,
        recipients,
        'comment',
        {
          projectSlug: project.slug,
          projectTitle: project.title,
          actor: { handle: user.handle, displayName: user.displayName },
          erratumNumber: erratum.number,
          erratumTitle: erratum.title,
          targetLabel: `${erratum.code} ${erratum.title}`,
          excerpt: excerptOf(body),
          path: `${erratumPath(project, erratum.number)}#comment-${created.id}`,
        },
        user.id,
      ),
    );
    return created;
  });
}
