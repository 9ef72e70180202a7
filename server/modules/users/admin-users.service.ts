import type { EntityManager } from '@mikro-orm/better-sqlite'
import type {
  AdminUserDto,
  SetSiteRoleBody,
  SetUserActiveBody,
} from '@shared/schemas/admin-user.schema'
import { ConflictError, NotFoundError } from '../../errors/http-error'
import type { Actor } from '../../services'
import { audit } from '../audit/audit.service'
import { Organization } from '../organizations/organization.entity'
import { User, type IUser } from './user.entity'
import { userIdsContaining } from './user-text-search'

async function toDtos(em: EntityManager, users: IUser[]): Promise<AdminUserDto[]> {
  const orgIds = [...new Set(users.map((u) => u.organization).filter((id) => id != null))]
  const orgs = orgIds.length ? await em.find(Organization, { id: { $in: orgIds } }) : []
  const orgName = new Map(orgs.map((o) => [o.id, o.name]))
  return users.map((u) => ({
    id: u.id,
    name: u.name,
    email: u.email,
    siteRole: u.siteRole ?? null,
    organization: u.organization != null ? (orgName.get(u.organization) ?? null) : null,
    lastSignInAt: u.lastSignInAt?.toISOString() ?? null,
    deactivatedAt: u.deactivatedAt?.toISOString() ?? null,
    createdAt: u.createdAt.toISOString(),
  }))
}

/** Everyone, by name; the search matches part of a name or e-mail, typed text taken literally. */
export async function listUsers(
  em: EntityManager,
  q: { search?: string; limit: number; offset: number },
) {
  let where = {}
  if (q.search) {
    where = { id: { $in: await userIdsContaining(em, q.search) } }
  }
  const [users, total] = await em.findAndCount(User, where, {
    orderBy: { name: 'asc', id: 'asc' },
    limit: q.limit,
    offset: q.offset,
  })
  return { items: await toDtos(em, users), total }
}

async function userFor(em: EntityManager, id: number) {
  const user = await em.findOne(User, { id })
  if (!user) throw new NotFoundError('user', id)
  return user
}

/** Sets or clears a site role; an admin cannot take their own admin role away (no lock-out). */
export async function setSiteRole(
  em: EntityManager,
  actor: Actor,
  id: number,
  { siteRole }: SetSiteRoleBody,
): Promise<AdminUserDto> {
  const user = await userFor(em, id)
  if (user.id === actor.user?.id && user.siteRole === 'admin' && siteRole !== 'admin')
    throw new ConflictError('You cannot take away your own admin role; ask another admin.')
  const from = user.siteRole ?? null
  if (from !== siteRole) {
    user.siteRole = siteRole
    audit(em, actor, {
      action: 'user.role',
      targetType: 'User',
      targetId: user.id,
      details: { from: from ?? 'none', to: siteRole ?? 'none' },
    })
    await em.flush()
  }
  return (await toDtos(em, [user]))[0]!
}

/**
 * Deactivates or reactivates an account. A deactivated person cannot sign in, their session and
 * tokens stop working at their next request (the users table raises the access version), and
 * everything they recorded stays.
 */
export async function setUserActive(
  em: EntityManager,
  actor: Actor,
  id: number,
  { active, reason }: SetUserActiveBody,
  now = new Date(),
): Promise<AdminUserDto> {
  const user = await userFor(em, id)
  if (!active && user.id === actor.user?.id)
    throw new ConflictError('You cannot deactivate your own account.')
  const isActive = user.deactivatedAt == null
  if (isActive !== active) {
    user.deactivatedAt = active ? null : now
    audit(em, actor, {
      action: active ? 'user.reactivate' : 'user.deactivate',
      targetType: 'User',
      targetId: user.id,
      details: reason ? { reason } : undefined,
    })
    await em.flush()
  }
  return (await toDtos(em, [user]))[0]!
}
