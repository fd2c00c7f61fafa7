/**
 * Members flag wrong or abusive content for the moderators. A member's repeated flags on one
 * target count once: the second answers with the first (200, `repeated: true`), so a double
 * click or a retry is harmless and nobody can pile flags onto content alone.
 */
import type { z } from 'zod';
import type { createFlagSchema, FlagCreated } from '../../shared/contracts/moderation';
import { toFlag } from './present';
import type { AppContext } from '../context';
import { fail } from '../http/errors';
import type { AuthUser } from '../http/routes';
import { readerOfTarget } from '../moderation/service';
import { loadTarget } from '../moderation/targets';
import { seesHidden } from '../moderation/visibility';
import * as q from './queries';

export async function createFlag(
  ctx: AppContext,
  user: AuthUser,
  input: z.output<typeof createFlagSchema>,
): Promise<FlagCreated> {
  const ref = { kind: input.targetKind, id: input.targetId };
  const target = await loadTarget(ctx.db, ref);
  const what = 'The content';
  if (!target) throw fail.notFound(what);
  const reader = await readerOfTarget(ctx, user, target);
  // Flagging needs to see the content first: another's draft or hidden content does not exist here.
  if (!reader.canRead) throw fail.notFound(what);
  if (target.hiddenAt && !seesHidden(reader, { authorId: target.authorId })) throw fail.notFound(what);
  if (target.authorId === user.id) throw fail.forbidden('You cannot flag your own content; edit or remove it instead.');
  const { flag, created } = await q.insertFlagOnce(ctx.db, {
    target: ref,
    projectId: target.projectId,
    authorId: user.id,
    reason: input.reason,
    text: input.text.trim(),
  });
  return { flag: toFlag(flag), repeated: !created };
}
