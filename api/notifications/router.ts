import {
  followStateSchema,
  markReadSchema,
  notificationListSchema,
  notificationSettingsSchema,
  updateNotificationSettingsSchema,
} from '../../shared/contracts/errata';
import { slugParamsSchema } from '../../shared/contracts/projects';
import type { AppContext } from '../context';
import { access, type ApiRoutes } from '../http/routes';
import { projectAccess, projectOf } from '../projects/access';
import * as service from './service';

export function registerNotificationRoutes(routes: ApiRoutes, ctx: AppContext) {
  const tag = 'notifications';
  const participant = projectAccess('participate');

  routes.get(
    '/me/notifications',
    {
      summary: 'Your notifications, unread first, with the unread count',
      tag,
      access: access.signedIn,
      response: notificationListSchema,
    },
    ({ user }) => service.listNotifications(ctx, user!),
  );

  routes.post(
    '/me/notifications/read',
    {
      summary: 'Mark notifications read',
      tag,
      access: access.signedIn,
      body: markReadSchema,
      response: notificationListSchema,
    },
    ({ user, body }) => service.markRead(ctx, user!, body),
  );

  routes.get(
    '/me/notification-settings',
    {
      summary: 'How each kind of notification reaches you',
      tag,
      access: access.signedIn,
      response: notificationSettingsSchema,
    },
    ({ user }) => service.settingsOf(ctx.db, user!.id),
  );

  routes.put(
    '/me/notification-settings',
    {
      summary: 'Choose immediately, daily digest or off per kind',
      tag,
      access: access.signedIn,
      body: updateNotificationSettingsSchema,
      response: notificationSettingsSchema,
    },
    async ({ user, body }) => {
      await service.setModes(ctx.db, user!.id, body.modes);
      return service.settingsOf(ctx.db, user!.id);
    },
  );

  routes.get(
    '/projects/:slug/follow',
    {
      summary: 'Whether you follow the project',
      tag,
      access: participant,
      params: slugParamsSchema,
      response: followStateSchema,
    },
    async ({ user, locals }) => ({
      following: await service.isFollowing(ctx.db, user!.id, projectOf(locals).project.id),
    }),
  );

  routes.put(
    '/projects/:slug/follow',
    {
      summary: 'Follow the project (new errata reach you)',
      tag,
      access: participant,
      params: slugParamsSchema,
      response: followStateSchema,
    },
    async ({ user, locals }) => {
      await service.setFollowing(ctx.db, user!.id, projectOf(locals).project.id, true);
      return { following: true };
    },
  );

  routes.delete(
    '/projects/:slug/follow',
    {
      summary: 'Stop following the project',
      tag,
      access: participant,
      params: slugParamsSchema,
      response: followStateSchema,
    },
    async ({ user, locals }) => {
      await service.setFollowing(ctx.db, user!.id, projectOf(locals).project.id, false);
      return { following: false };
    },
  );
}
