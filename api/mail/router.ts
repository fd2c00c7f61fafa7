import express from 'express';
import type { AppContext } from '../context';
import { access, type ApiRoutes } from '../http/routes';
import {
  outboxListSchema,
  outboxMessageSchema,
  outboxParamsSchema,
  unsubscribeQuerySchema,
  unsubscribeStateSchema,
} from '../../shared/contracts/mail';
import * as service from './service';

export function registerMailRoutes(routes: ApiRoutes, ctx: AppContext) {
  routes.get(
    '/unsubscribe',
    {
      summary: 'What a signed unsubscribe link turns off (changes nothing: mail scanners fetch links)',
      tag: 'mail',
      access: access.public,
      query: unsubscribeQuerySchema,
      response: unsubscribeStateSchema,
      session: false,
    },
    ({ query }) => service.describeUnsubscribe(ctx, query.token),
  );

  routes.post(
    '/unsubscribe',
    {
      summary:
        'Turn off the kind a signed unsubscribe link names (RFC 8058 one-click: body List-Unsubscribe=One-Click)',
      tag: 'mail',
      access: access.public,
      csrfExempt: 'one-click unsubscribe from mail clients (RFC 8058), authenticated by the signed token',
      query: unsubscribeQuerySchema,
      response: unsubscribeStateSchema,
      // Mail clients post a form body; the token in the URL is all that is needed.
      before: [express.urlencoded({ extended: false, limit: '1kb' })],
    },
    ({ query }) => service.unsubscribe(ctx, query.token),
  );

  // The development outbox: only while the local capture server stands in for SMTP, and never
  // in production. Public on purpose: it exists only on a developer's machine, where every
  // captured message went to an invented demo address.
  const outbox = ctx.outbox;
  if (!outbox || ctx.config.production) return;
  routes.get(
    '/dev/outbox',
    {
      summary: 'Messages the local mail capture received (development only)',
      tag: 'dev',
      access: access.public,
      response: outboxListSchema,
    },
    () => service.listOutbox(outbox),
  );
  routes.get(
    '/dev/outbox/:id',
    {
      summary: 'One captured message: headers, text and HTML (development only)',
      tag: 'dev',
      access: access.public,
      params: outboxParamsSchema,
      response: outboxMessageSchema,
    },
    ({ params }) => service.outboxMessage(outbox, params.id),
  );
}
