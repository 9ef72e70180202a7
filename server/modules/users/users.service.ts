import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { SiteRole } from '@shared/domain/roles'
import { Organization } from '../organizations/organization.entity'
import { User, type IUser } from './user.entity'

export interface IdentityClaims {
  sub: string
  email?: string
  email_verified?: boolean
  name?: string
}

const domainOf = (email: string) => email.slice(email.lastIndexOf('@') + 1).toLowerCase()
const nameFromEmail = (email: string) => email.slice(0, email.indexOf('@'))

async function organizationFor(em: EntityManager, email: string): Promise<number | null> {
  const org = await em.findOne(Organization, { emailDomain: domainOf(email) })
  return org?.id ?? null
}

/**
 * The user behind a set of ID-token/userinfo claims, created at first sign-in. A person invited by
 * e-mail before they ever signed in is matched by their verified address and linked to `sub`.
 */
export async function userFromClaims(
  em: EntityManager,
  claims: IdentityClaims,
  now = new Date(),
): Promise<IUser> {
  let user = await em.findOne(User, { subject: claims.sub })
  const email = claims.email?.trim().toLowerCase()
  if (!user && email && claims.email_verified !== false) {
    user = await em.findOne(User, { email, subject: null })
    if (user) user.subject = claims.sub
  }
  if (!user) {
    if (!email) throw new Error('The identity provider sent no e-mail address for this account.')
    user = em.create(User, {
      subject: claims.sub,
      email,
      name: claims.name?.trim() || nameFromEmail(email),
      siteRole: null,
      organization: await organizationFor(em, email),
    })
  }
  if (claims.name && user.name === nameFromEmail(user.email)) user.name = claims.name.trim()
  user.lastSignInAt = now
  await em.flush()
  return user
}

/** The user with this address, or a new one who can sign in later (invitations, shares, the CLI). */
export async function findOrInviteUser(
  em: EntityManager,
  email: string,
  options: { name?: string; siteRole?: SiteRole | null } = {},
): Promise<{ user: IUser; created: boolean }> {
  const address = email.trim().toLowerCase()
  const existing = await em.findOne(User, { email: address })
  if (existing) {
    if (options.name) existing.name = options.name
    if (options.siteRole !== undefined) existing.siteRole = options.siteRole
    await em.flush()
    return { user: existing, created: false }
  }
  const user = em.create(User, {
    email: address,
    name: options.name ?? nameFromEmail(address),
    siteRole: options.siteRole ?? null,
    organization: await organizationFor(em, address),
  })
  await em.flush()
  return { user, created: true }
}
