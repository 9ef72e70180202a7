import { defineEntity, p, type InferEntity } from '@mikro-orm/core'
import type { SiteRole } from '@shared/domain/roles'
import { Organization } from '../organizations/organization.entity'

/**
 * A person. `subject` is the identity provider's `sub`; it is null for people invited by e-mail
 * who have not signed in yet.
 */
export const User = defineEntity({
  name: 'User',
  properties: {
    id: p.integer().primary(),
    subject: p.string().nullable().unique(),
    email: p.string().unique(),
    name: p.string(),
    siteRole: p.string().$type<SiteRole>().nullable(),
    organization: p.manyToOne(Organization).mapToPk().nullable(),
    createdAt: p.datetime().onCreate(() => new Date()),
    lastSignInAt: p.datetime().nullable(),
    /** Set by an admin: the person can no longer sign in or use tokens; their records stay. */
    deactivatedAt: p.datetime().nullable(),
  },
})
export type IUser = InferEntity<typeof User>
