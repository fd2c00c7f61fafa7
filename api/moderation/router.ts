import {
  dismissFlagSchema,
  flagParamsSchema,
  flagQueueQuerySchema,
  flagQueueSchema,
  flagSchema,
  hideTargetSchema,
  moderationActionResultSchema,
  moderationTargetDetailSchema,
  restoreTargetSchema,
  targetParamsSchema,
} from '../../shared/contracts/moderation';
import type { AppContext } from '../context';
import { access, type ApiRoutes } from '../http/routes';
import { rateLimit } from '../middleware/rate-limit';
import * as service from './service';

export function registerModerationRoutes(routes: ApiRoutes, ctx: AppContext) {
  const writes = rateLimit(ctx, { name: 'writes', points: 300, durationSeconds: 60 });
  const tag = 'moderation';
  const moderator = access.moderator;
  const ref = (p: { targetKind: service.TargetKind; targetId: number }) => ({ kind: p.targetKind, id: p.targetId });

  routes.get(
    '/moderation/flags',
    {
      summary: 'Flags of one state grouped by target, most flagged first, with the content in context',
      tag,
      access: moderator,
      query: flagQueueQuerySchema,
      response: flagQueueSchema,
    },
    ({ query }) => service.flagQueue(ctx, query.state, query.page),
  );

  routes.get(
    '/moderation/targets/:targetKind/:targetId',
    {
      summary: 'One flagged item in context with all its flags',
      tag,
      access: moderator,
      params: targetParamsSchema,
      response: moderationTargetDetailSchema,
    },
    ({ params }) => service.targetDetail(ctx, ref(params)),
  );

  routes.post(
    '/moderation/targets/:targetKind/:targetId/hide',
    {
      summary: 'Hide content with a public reason (closes its open flags as actioned)',
      tag,
      access: moderator,
      params: targetParamsSchema,
      body: hideTargetSchema,
      response: moderationActionResultSchema,
      before: [writes],
    },
    ({ user, params, body }) => service.hideTarget(ctx, user!, ref(params), body.reason),
  );

  routes.post(
    '/moderation/targets/:targetKind/:targetId/restore',
    {
      summary: 'Show hidden content again (closes its open flags as actioned)',
      tag,
      access: moderator,
      params: targetParamsSchema,
      body: restoreTargetSchema,
      response: moderationActionResultSchema,
      before: [writes],
    },
    ({ user, params, body }) => service.restoreTarget(ctx, user!, ref(params), body.reason),
  );

  routes.post(
    '/moderation/flags/:flagId/dismiss',
    {
      summary: 'Dismiss one open flag (the content stays as it is)',
      tag,
      access: moderator,
      params: flagParamsSchema,
      body: dismissFlagSchema,
      response: flagSchema,
      before: [writes],
    },
    ({ user, params, body }) => service.dismissFlag(ctx, user!, params.flagId, body.reason),
  );
}
