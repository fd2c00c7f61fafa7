import { auditForParamsSchema, auditListSchema, auditQuerySchema } from '../../shared/contracts/moderation';
import type { AppContext } from '../context';
import { access, type ApiRoutes } from '../http/routes';
import * as service from './service';

/** Read-only: the log is append-only (trigger in db/migrations/0001_guards.sql) and no route writes it. */
export function registerAuditRoutes(routes: ApiRoutes, ctx: AppContext) {
  const tag = 'moderation';

  routes.get(
    '/audit',
    {
      summary: 'Search the audit log, newest first',
      tag,
      access: access.moderator,
      query: auditQuerySchema,
      response: auditListSchema,
    },
    ({ query }) => service.searchAudit(ctx, query),
  );

  routes.get(
    '/audit/for/:targetKind/:targetId',
    {
      summary: "One item's moderation history (moderators, the item's author, the project's owner)",
      tag,
      access: access.signedIn,
      params: auditForParamsSchema,
      response: auditListSchema,
    },
    ({ user, params }) => service.auditForTarget(ctx, user!, { kind: params.targetKind, id: params.targetId }),
  );
}
