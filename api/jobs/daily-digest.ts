/**
 * `daily-digest` (every day at 07:00 UTC): one e-mail per member who gets some kinds as a
 * daily digest and has such notifications not e-mailed yet, listing them by project; they
 * are marked `emailed` right after the server accepted the message. A member whose message
 * fails does not stop the others; the job then fails so the queue retries it, and the retry
 * only finds the members still pending.
 */
import type { AppContext } from '../context';
import { markEmailed, pendingDigestRows, type NotificationForEmail } from '../mail/queries';
import {
  appLink,
  NOTIFICATION_SETTINGS_PATH,
  NOTIFICATIONS_PATH,
  renderDigestEmail,
  type DigestItem,
} from '../mail/templates';
import { listUnsubscribeHeaders, unsubscribeLinks } from '../mail/unsubscribe';
import { readNotification } from './notification-email';

export const DAILY_DIGEST_CRON = '0 7 * * *';

export interface DigestRun {
  /** Digest e-mails the server accepted. */
  sent: number;
  /** Notifications those e-mails listed (now marked e-mailed). */
  notifications: number;
  /** Members whose digest could not be sent this time. */
  failed: number;
}

export async function runDailyDigest(ctx: AppContext, now = new Date()): Promise<DigestRun> {
  const rows = await pendingDigestRows(ctx.db, now);
  const byUser = new Map<number, NotificationForEmail[]>();
  for (const row of rows) byUser.set(row.userId, [...(byUser.get(row.userId) ?? []), row]);

  const run: DigestRun = { sent: 0, notifications: 0, failed: 0 };
  let firstError: unknown;
  for (const [userId, userRows] of byUser) {
    const first = userRows[0]!;
    const items: DigestItem[] = [];
    for (const row of userRows) {
      const read = readNotification(row);
      if (read) items.push({ ...read, open: appLink(ctx.config.appOrigin, read.payload.path) });
    }
    if (items.length === 0 || !first.email) continue;
    const unsubscribe = unsubscribeLinks(ctx.config, userId, 'daily_digest');
    const rendered = renderDigestEmail(
      items,
      { displayName: first.displayName, handle: first.handle },
      {
        unsubscribe: unsubscribe.page,
        settings: appLink(ctx.config.appOrigin, NOTIFICATION_SETTINGS_PATH),
        all: appLink(ctx.config.appOrigin, NOTIFICATIONS_PATH),
      },
    );
    try {
      await ctx.mail.send({ to: first.email, ...rendered, headers: listUnsubscribeHeaders(unsubscribe.oneClick) });
    } catch (error) {
      run.failed++;
      firstError ??= error;
      continue;
    }
    // Unreadable rows are marked too: they would otherwise come back in every digest.
    await markEmailed(
      ctx.db,
      userRows.map((r) => r.id),
    );
    run.notifications += items.length;
    run.sent++;
  }
  if (firstError !== undefined) {
    throw new Error(
      `daily digest: ${run.failed} of ${byUser.size} member(s) could not be mailed (${(firstError as Error).message})`,
      {
        cause: firstError,
      },
    );
  }
  return run;
}
