/** Contracts of the unsubscribe and development outbox routes (server and pages share them). */
import { z } from 'zod';
import { notificationKinds } from './errata';
import { notificationModes } from '../domain';

export const unsubscribeQuerySchema = z.object({ token: z.string().max(400).optional() });

export const unsubscribeStateSchema = z
  .object({
    /** A notification kind, or `daily_digest` for every kind delivered in the daily digest. */
    kind: z.enum([...notificationKinds, 'daily_digest']),
    mode: z.enum(notificationModes),
  })
  .meta({ id: 'UnsubscribeState' });
export type UnsubscribeState = z.infer<typeof unsubscribeStateSchema>;

export const outboxParamsSchema = z.strictObject({
  id: z.string().regex(/^[0-9]{8}T[0-9]{9}-[0-9a-f]{8}$/, 'a message id'),
});

export const outboxSummarySchema = z.object({
  id: z.string(),
  to: z.string(),
  subject: z.string(),
  receivedAt: z.string(),
});

export const outboxListSchema = z.object({ items: z.array(outboxSummarySchema) }).meta({ id: 'DevOutboxList' });

export const outboxMessageSchema = outboxSummarySchema
  .extend({
    from: z.string(),
    headers: z.array(z.object({ name: z.string(), value: z.string() })),
    text: z.string(),
    html: z.string().nullable(),
  })
  .meta({ id: 'DevOutboxMessage' });

export type OutboxSummary = z.infer<typeof outboxSummarySchema>;
export type OutboxMessage = z.infer<typeof outboxMessageSchema>;
export type UnsubscribeScope = UnsubscribeState['kind'];
