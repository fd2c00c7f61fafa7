/**
 * Unsubscribing through a signed link, and the development outbox views. A link names one
 * member and one kind (or the daily digest); looking at it changes nothing, posting to it
 * turns that kind off.
 */
import { notificationKinds, type NotificationKind } from '../../shared/contracts/errata';
import type { AppContext } from '../context';
import type { CapturedMessage, Outbox } from '../fakes/smtp';
import { fail } from '../http/errors';
import type { UnsubscribeState } from '../../shared/contracts/mail';
import { modesOf, setModes, userExists } from './queries';
import { verifyUnsubscribeToken, type UnsubscribeScope } from './unsubscribe';

async function checkToken(
  ctx: AppContext,
  token: string | undefined,
): Promise<{ userId: number; kind: UnsubscribeScope }> {
  const verified = token ? verifyUnsubscribeToken(ctx.config.sessionSecret, token) : null;
  if (!verified || !(await userExists(ctx.db, verified.userId))) {
    throw fail.badRequest(
      'This unsubscribe link is not valid. Change what you receive in your notification settings instead.',
    );
  }
  return verified;
}

const digestKinds = (modes: Record<NotificationKind, string>) => notificationKinds.filter((k) => modes[k] === 'daily');

/** What the link would turn off, and its current mode. */
export async function describeUnsubscribe(ctx: AppContext, token: string | undefined): Promise<UnsubscribeState> {
  const { userId, kind } = await checkToken(ctx, token);
  const modes = await modesOf(ctx.db, userId);
  if (kind === 'daily_digest') return { kind, mode: digestKinds(modes).length > 0 ? 'daily' : 'off' };
  return { kind, mode: modes[kind] };
}

export async function unsubscribe(ctx: AppContext, token: string | undefined): Promise<UnsubscribeState> {
  const { userId, kind } = await checkToken(ctx, token);
  await ctx.db.transaction(async (tx) => {
    const kinds = kind === 'daily_digest' ? digestKinds(await modesOf(tx, userId)) : [kind];
    await setModes(tx, userId, kinds, 'off');
  });
  ctx.log.info(`member ${userId} unsubscribed from ${kind} e-mails`);
  return { kind, mode: 'off' };
}

const summary = (m: CapturedMessage) => ({
  id: m.id,
  to: m.to,
  subject: m.subject,
  receivedAt: m.receivedAt.toISOString(),
});

export const listOutbox = (outbox: Outbox) => ({ items: outbox.messages().map(summary) });

export function outboxMessage(outbox: Outbox, id: string) {
  const m = outbox.message(id);
  if (!m) throw fail.notFound('The message');
  return { ...summary(m), from: m.from, headers: m.headers, text: m.text, html: m.html };
}
