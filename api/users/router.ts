import {
  adminUserListQuerySchema,
  adminUserListSchema,
  adminUserSchema,
  changeRoleSchema,
  currentUserSchema,
  handleParamSchema,
  meResponseSchema,
  suspendSchema,
  updateMeSchema,
} from '../../shared/contracts/users';
import type { AppContext } from '../context';
import { access, type ApiRoutes } from '../http/routes';
import * as service from './service';

export function registerUserRoutes(routes: ApiRoutes, ctx: AppContext) {
  routes.get(
    '/me',
    { summary: 'The signed-in member (or null) and the CSRF token', tag: 'users', access: access.public, response: meResponseSchema },
    ({ req, user, res }) => {
      res.set('Cache-Control', 'no-store');
      return {
        user: user ? service.toCurrentUser(user) : null,
        csrfToken: user ? (req.session.csrfToken ?? null) : null,
        signInProvider: ctx.github.fake ? 'fake-github' : 'github',
        devOutbox: ctx.outbox !== undefined && !ctx.config.production,
      };
    },
  );

  routes.patch(
    '/me',
    { summary: 'Change your display name', tag: 'users', access: access.signedIn, body: updateMeSchema, response: currentUserSchema },
    async ({ user, body }) => service.toCurrentUser(await service.updateProfile(ctx, user!, body.displayName)),
  );

  routes.get(
    '/admin/users',
    { summary: 'List members (admin)', tag: 'admin', access: access.admin, query: adminUserListQuerySchema, response: adminUserListSchema },
    ({ query }) => service.listUsersForAdmin(ctx, query),
  );

  routes.put(
    '/admin/users/:handle/role',
    {
      summary: "Change a member's site role (admin)",
      tag: 'admin',
      access: access.admin,
      params: handleParamSchema,
      body: changeRoleSchema,
      response: adminUserSchema,
    },
    ({ user, params, body }) => service.changeRole(ctx, user!, params.handle, body.role),
  );

  routes.put(
    '/admin/users/:handle/suspension',
    {
      summary: 'Suspend or reinstate a member (admin); suspension ends their sessions at once',
      tag: 'admin',
      access: access.admin,
      params: handleParamSchema,
      body: suspendSchema,
      response: adminUserSchema,
    },
    ({ user, params, body }) => service.setSuspension(ctx, user!, params.handle, body.suspended, body.reason),
  );
}
