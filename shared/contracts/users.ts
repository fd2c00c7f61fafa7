import { z } from 'zod';
import { siteRoles } from '../domain';
import { handleSchema, line } from '../text';

export const userSummarySchema = z
  .object({
    id: z.number().int(),
    handle: z.string(),
    displayName: z.string(),
    avatarUrl: z.string().nullable(),
  })
  .meta({ id: 'UserSummary' });
export type UserSummary = z.infer<typeof userSummarySchema>;

export const currentUserSchema = userSummarySchema
  .extend({
    email: z.string().nullable(),
    role: z.enum(siteRoles),
  })
  .meta({ id: 'CurrentUser' });
export type CurrentUser = z.infer<typeof currentUserSchema>;

export const meResponseSchema = z
  .object({
    user: currentUserSchema.nullable(),
    /** Send back in the X-CSRF-Token header on every unsafe request. Null when signed out. */
    csrfToken: z.string().nullable(),
    signInProvider: z.enum(['github', 'fake-github']),
    /** True on a developer's machine where the local mail capture and its outbox page run. */
    devOutbox: z.boolean(),
  })
  .meta({ id: 'Me' });
export type MeResponse = z.infer<typeof meResponseSchema>;

export const updateMeSchema = z
  .strictObject({
    displayName: line({ max: 80, label: 'Display name' }),
  })
  .meta({ id: 'UpdateMe' });
export type UpdateMe = z.infer<typeof updateMeSchema>;

export const adminUserSchema = currentUserSchema
  .extend({
    suspendedAt: z.string().nullable(),
    suspendedReason: z.string().nullable(),
    createdAt: z.string(),
  })
  .meta({ id: 'AdminUser' });
export type AdminUser = z.infer<typeof adminUserSchema>;

export const adminUserListQuerySchema = z.strictObject({
  q: z.string().trim().max(80).optional(),
  role: z.enum(siteRoles).optional(),
  page: z.coerce.number().int().min(1).max(10_000).default(1),
});
export type AdminUserListQuery = z.infer<typeof adminUserListQuerySchema>;

export const adminUserListSchema = z
  .object({ items: z.array(adminUserSchema), total: z.number().int(), page: z.number().int(), pageSize: z.number().int() })
  .meta({ id: 'AdminUserList' });
export type AdminUserList = z.infer<typeof adminUserListSchema>;

export const changeRoleSchema = z.strictObject({ role: z.enum(siteRoles) }).meta({ id: 'ChangeRole' });
export type ChangeRole = z.infer<typeof changeRoleSchema>;

export const suspendSchema = z
  .strictObject({ suspended: z.boolean(), reason: line({ min: 0, max: 500, label: 'Reason' }).default('') })
  .meta({ id: 'Suspend' });
export type Suspend = z.infer<typeof suspendSchema>;

export const handleParamSchema = z.strictObject({ handle: handleSchema });

export const healthSchema = z
  .object({ status: z.enum(['ok', 'degraded']), db: z.enum(['ok', 'down']) })
  .meta({ id: 'Health' });
export type Health = z.infer<typeof healthSchema>;
