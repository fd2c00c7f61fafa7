/**
 * `notification-email`: one notification, one e-mail, for members who get that kind
 * immediately. Delivery is at least once: the row is marked `emailed` right after the server
 * accepted the message, and a retry (or a duplicate job) that finds it marked sends nothing.
 * Jobs carry the notification id as their singleton key, and the queue lets only one job per
 * key run at a time.
 */
import type { AppContext } from '../context';
import {
  notificationKinds,
  notificationPayloadSchema,
  type NotificationKind,
  type NotificationPayload,
} from '../../shared/contracts/errata';
import type { MailMessage } from '../mail/mailer';
import { findNotificationForEmail, markEmailed, pendingImmediateIds, type NotificationForEmail } from '../mail/queries';
import { appLink, NOTIFICATION_SETTINGS_PATH, renderNotificationEmail } from '../mail/templates';
import { listUnsubscribeHeaders, unsubscribeLinks } from '../mail/unsubscribe';

export type NotificationEmailOutcome =
  'sent' | 'missing' | 'already-emailed' | 'no-recipient' | 'not-immediate' | 'unreadable';

export const notificationJobKey = (notificationId: number) => `notification-${notificationId}`;

/** A stored notification's kind and payload, or null when the row is not one we can write. */
export function readNotification(
  row: Pick<NotificationForEmail, 'kind' | 'payload'>,
): { kind: NotificationKind; payload: NotificationPayload } | null {
  if (!(notificationKinds as readonly string[]).includes(row.kind)) return null;
  const payload = notificationPayloadSchema.safeParse(row.payload);
  return payload.success ? { kind: row.kind as NotificationKind, payload: payload.data } : null;
}

export function buildNotificationMessage(
  config: AppContext['config'],
  row: NotificationForEmail & { email: string },
  kind: NotificationKind,
  payload: NotificationPayload,
): MailMessage {
  const unsubscribe = unsubscribeLinks(config, row.userId, kind);
  const rendered = renderNotificationEmail(
    kind,
    payload,
    { displayName: row.displayName, handle: row.handle },
    {
      open: appLink(config.appOrigin, payload.path),
      unsubscribe: unsubscribe.page,
      settings: appLink(config.appOrigin, NOTIFICATION_SETTINGS_PATH),
    },
  );
  return { to: row.email, ...rendered, headers: listUnsubscribeHeaders(unsubscribe.oneClick) };
}

export async function sendNotificationEmail(
  ctx: AppContext,
  notificationId: number,
): Promise<NotificationEmailOutcome> {
  const row = await findNotificationForEmail(ctx.db, notificationId);
  if (!row) return 'missing';
  if (row.emailed) return 'already-emailed';
  if (!row.email || row.suspended) return 'no-recipient';
  if (row.mode !== 'immediate') return 'not-immediate';
  const read = readNotification(row);
  if (!read) {
    ctx.log.warn(`notification ${notificationId} has a kind or payload no e-mail can be written for; not sent`);
    return 'unreadable';
  }
  await ctx.mail.send(buildNotificationMessage(ctx.config, { ...row, email: row.email }, read.kind, read.payload));
  await markEmailed(ctx.db, [row.id]);
  return 'sent';
}

/** Recovery sweep: how old a pending notification must be before the sweep enqueues it. */
export const SWEEP_GRACE_MS = 2 * 60_000;
/** …and how far back it looks (older ones are left alone rather than mailed days late). */
export const SWEEP_WINDOW_MS = 24 * 60 * 60_000;

/**
 * Enqueues every immediate-mode notification that is still not e-mailed two minutes after it
 * was created: the lead path enqueues right after its commit, so these are the ones a crash
 * between commit and enqueue left behind. Runs on a schedule; duplicates are harmless (same
 * singleton key, and the job skips rows already e-mailed).
 */
export async function enqueuePendingNotificationEmails(ctx: AppContext, now = new Date()): Promise<number> {
  const ids = await pendingImmediateIds(
    ctx.db,
    { from: new Date(now.getTime() - SWEEP_WINDOW_MS), to: new Date(now.getTime() - SWEEP_GRACE_MS) },
    1_000,
  );
  let queued = 0;
  for (const notificationId of ids) {
    if (
      await ctx.jobs.send(
        'notification-email',
        { notificationId },
        { singletonKey: notificationJobKey(notificationId) },
      )
    )
      queued++;
  }
  if (queued > 0) ctx.log.info(`queued ${queued} notification e-mail(s) that were never sent`);
  return queued;
}
