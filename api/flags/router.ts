import { createFlagSchema, flagCreatedSchema } from '../../shared/contracts/moderation';
import type { AppContext } from '../context';
import { access, type ApiRoutes } from '../http/routes';
import { memberBudgets, rateLimit } from '../middleware/rate-limit';
import * as service from './service';

export function registerFlagRoutes(routes: ApiRoutes, ctx: AppContext) {
  const flagging = rateLimit(ctx, memberBudgets.flags);

  routes.post(
    '/flags',
    {
      summary: 'Flag wrong or abusive content for the moderators (201; 200 with your existing flag when repeated)',
      tag: 'moderation',
      access: access.signedIn,
      body: createFlagSchema,
      response: flagCreatedSchema,
      before: [flagging],
    },
    async ({ user, body, res }) => {
      const result = await service.createFlag(ctx, user!, body);
      // The route framework keeps a status the handler set other than 200; 200 is its default.
      if (!result.repeated) res.status(201);
      return result;
    },
  );
}
