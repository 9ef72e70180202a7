import { z } from 'zod'
import { SITE_ROLES } from '../domain/roles'
import { pageQuerySchema } from './common.schema'

/** GET /api/users: the admin's list, searched by name or e-mail. */
export const adminUserQuerySchema = pageQuerySchema.extend({
  search: z.string().trim().max(120).optional(),
})

/** One person on the admin's users page. */
export const adminUserSchema = z
  .object({
    id: z.number(),
    name: z.string(),
    email: z.string(),
    siteRole: z.enum(SITE_ROLES).nullable(),
    organization: z.string().nullable(),
    /** Null for people invited by e-mail who have never signed in. */
    lastSignInAt: z.string().nullable(),
    /** Set when an admin deactivated the account: no sign-in, no tokens. */
    deactivatedAt: z.string().nullable(),
    createdAt: z.string(),
  })
  .meta({ id: 'AdminUser' })
export type AdminUserDto = z.infer<typeof adminUserSchema>

export const setSiteRoleSchema = z
  .object({
    siteRole: z
      .enum(SITE_ROLES, { error: `Site role must be one of ${SITE_ROLES.join(', ')}` })
      .nullable(),
  })
  .meta({ id: 'SetSiteRole' })
export type SetSiteRoleBody = z.output<typeof setSiteRoleSchema>

export const setUserActiveSchema = z
  .object({
    active: z.boolean(),
    reason: z.string().trim().max(2000).default(''),
  })
  .meta({ id: 'SetUserActive' })
export type SetUserActiveInput = z.input<typeof setUserActiveSchema>
export type SetUserActiveBody = z.output<typeof setUserActiveSchema>
