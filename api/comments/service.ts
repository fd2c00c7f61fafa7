/**
 * Discussion threads on proposals and errata: Markdown comments rendered with the same rules as
 * write-ups. Posting notifies everyone already in the thread (and the item's author).
 */
import { asc, eq } from 'drizzle-orm';
import type { Comment, CommentList } from '../../shared/contracts/errata';
import type { DbOrTx, Tx } from '../../db/client';
import { comments, users } from '../../db/schema';
import type { AppContext } from '../context';
import type { AuthUser } from '../http/routes';
import { renderCached } from '../markdown/cache';
import { plainTextOf } from '../markdown/render';
import { imagesForMarkdown, type ImageMap } from '../uploads/images';
import { syncUploadRefs } from '../uploads/refs';
import { hiddenOf, seesHidden, type Hideable } from '../moderation/visibility';

export type ThreadTarget = { proposalId: number } | { erratumId: number };

const whereTarget = (target: ThreadTarget) =>
  'proposalId' in target ? eq(comments.proposalId, target.proposalId) : eq(comments.erratumId, target.erratumId);

function toComment(
  row: {
    id: number;
    body: string;
    createdAt: Date;
    authorId: number;
    handle: string;
    displayName: string;
    avatarUrl: string | null;
  },
  images: ImageMap,
  hidden: { row: Hideable; shown: boolean } | null = null,
): Comment {
  // A hidden comment keeps its place in the thread; only its author and moderators read it.
  const withheld = hidden !== null && !hidden.shown;
  return {
    id: row.id,
    author: { id: row.authorId, handle: row.handle, displayName: row.displayName, avatarUrl: row.avatarUrl },
    body: withheld ? '' : row.body,
    html: withheld ? '' : renderCached(`comment:${row.id}`, row.body, `c${row.id}-`, images).html,
    createdAt: row.createdAt.toISOString(),
    hidden: hidden ? hiddenOf(hidden.row) : null,
  };
}

const columns = {
  id: comments.id,
  projectId: comments.projectId,
  body: comments.body,
  createdAt: comments.createdAt,
  authorId: users.id,
  handle: users.handle,
  displayName: users.displayName,
  avatarUrl: users.avatarUrl,
  hiddenAt: comments.hiddenAt,
  hiddenReason: comments.hiddenReason,
};

export async function listComments(ctx: AppContext, target: ThreadTarget, user: AuthUser | null): Promise<CommentList> {
  const rows = await ctx.db
    .select(columns)
    .from(comments)
    .innerJoin(users, eq(users.id, comments.authorId))
    .where(whereTarget(target))
    .orderBy(asc(comments.createdAt), asc(comments.id));
  const images = rows.length
    ? await imagesForMarkdown(
        ctx.db,
        rows.map((r) => r.body),
        rows[0]!.projectId,
      )
    : new Map();
  const reader = { user, projectRole: null };
  return {
    items: rows.map((row) =>
      toComment(
        row,
        images,
        row.hiddenAt ? { row, shown: seesHidden(reader, { authorId: row.authorId, only: 'author' }) } : null,
      ),
    ),
    canComment: user !== null,
  };
}

/** Everyone who has commented in the thread (for notifications). */
export async function threadParticipants(db: DbOrTx, target: ThreadTarget): Promise<number[]> {
  const rows = await db.selectDistinct({ id: comments.authorId }).from(comments).where(whereTarget(target));
  return rows.map((r) => r.id);
}

export async function insertComment(
  tx: Tx,
  target: ThreadTarget,
  projectId: number,
  user: AuthUser,
  body: string,
): Promise<Comment> {
  const [row] = await tx
    .insert(comments)
    .values({ projectId, authorId: user.id, body, ...target })
    .returning({ id: comments.id, body: comments.body, createdAt: comments.createdAt });
  await syncUploadRefs(tx, 'comment', row!.id, projectId, [body]);
  return toComment(
    {
      ...row!,
      authorId: user.id,
      handle: user.handle,
      displayName: user.displayName,
      avatarUrl: user.avatarUrl,
    },
    await imagesForMarkdown(tx, [body], projectId),
  );
}

/** A short plain-text excerpt of Markdown for notifications (markup removed by the renderer). */
export function excerptOf(markdown: string, max = 280): string {
  const text = plainTextOf(markdown).replace(/\s+/g, ' ').trim();
  return text.length > max ? `${text.slice(0, max - 1)}…` : text;
}
