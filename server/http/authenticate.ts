import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { Request, RequestHandler } from 'express'
import { defineAbilityFor, type AppAbility } from '@shared/permissions/abilities'
import type { Viewer } from '@shared/permissions/viewer'
import { UnauthorizedError } from '../errors/http-error'
import type { AccessVersionReader } from '../modules/common/access-version'
import { ApiToken } from '../modules/tokens/api-token.entity'
import { hashToken } from '../modules/tokens/token-secret'
import { User, type IUser } from '../modules/users/user.entity'
import { loadViewer } from '../modules/users/viewer.service'
import { requestEm } from './request-context'
import { VersionedCache } from './versioned-cache'

type AuthMethod = Request['authMethod']

/** Who is signed in: a snapshot of their user row, safe to keep beyond one request. */
export type CurrentUser = Pick<IUser, 'id' | 'email' | 'name' | 'siteRole' | 'organization'>

interface Identity {
  user: CurrentUser
  /** Frozen: it is shared by every request of this identity until the access version moves. */
  viewer: Readonly<Viewer>
  tokenId?: number
  expiresAt?: number | null
  lastUsedWrite?: number
  /** The abilities built for one clock second (see abilityAt). */
  ability?: { second: number; value: AppAbility }
}

/** lastUsedAt is written at most this often, so token auth does not turn every read into a write. */
const LAST_USED_RESOLUTION_MS = 60_000

const snapshot = (u: IUser): CurrentUser => ({
  id: u.id,
  email: u.email,
  name: u.name,
  siteRole: u.siteRole ?? null,
  organization: u.organization ?? null,
})

async function identityFor(
  em: EntityManager,
  user: IUser | null,
  extra: Partial<Identity> = {},
): Promise<Identity | null> {
  // A deactivated account is nobody: its session reads as signed out, its tokens as unknown.
  return user && user.deactivatedAt == null
    ? { user: snapshot(user), viewer: deepFreeze(await loadViewer(em, user)), ...extra }
    : null
}

function deepFreeze<T extends object>(value: T): T {
  for (const inner of Object.values(value))
    if (inner && typeof inner === 'object') deepFreeze(inner as object)
  return Object.freeze(value)
}

/**
 * Abilities depend on the clock only through embargo dates, which are whole days. Building them
 * once per identity and second (at the start of that second) saves the work on every request and
 * keeps the list filters, and so the page caches, the same for that second. An embargo therefore
 * ends at most one second late, never early.
 */
function abilityAt(
  identity: Identity | null,
  now: number,
  publicAbility: { second: number; value: AppAbility },
): AppAbility {
  const second = Math.floor(now / 1000)
  const slot = identity ? identity.ability : publicAbility
  if (slot?.second === second) return slot.value
  const value = defineAbilityFor(identity?.viewer ?? null, new Date(second * 1000))
  if (identity) identity.ability = { second, value }
  else Object.assign(publicAbility, { second, value })
  return value
}

async function tokenIdentity(
  em: EntityManager,
  tokenHash: string,
  now: number,
): Promise<Identity | null> {
  const token = await em.findOne(ApiToken, {
    tokenHash,
    revokedAt: null,
    $or: [{ expiresAt: null }, { expiresAt: { $gt: new Date(now) } }],
  })
  if (!token) return null
  const user = await em.findOne(User, { id: token.user })
  return identityFor(em, user, {
    tokenId: token.id,
    expiresAt: token.expiresAt?.getTime() ?? null,
    lastUsedWrite: token.lastUsedAt?.getTime() ?? 0,
  })
}

function assertUsable(identity: Identity | null, now: number): asserts identity is Identity {
  if (!identity || (identity.expiresAt != null && identity.expiresAt <= now))
    throw new UnauthorizedError('That token is unknown, revoked or expired.')
}

const lastUseDue = (identity: Identity, now: number) =>
  now - (identity.lastUsedWrite ?? 0) > LAST_USED_RESOLUTION_MS

/**
 * Hashes of the bearer tokens this process accepted lately. The failed-token limiter exists for
 * guesses; a token already accepted (its first use went through the limiter) need not pay for it
 * on every request, so the limiter skips these. One that stops working is dropped at once.
 */
export class AcceptedTokens {
  private readonly hashes = new Set<string>()

  static hashOf(header: string): string | null {
    const match = /^Bearer\s+(\S+)$/i.exec(header)
    return match?.[1] ? hashToken(match[1]) : null
  }

  has(header: string | undefined): boolean {
    const hash = header === undefined ? null : AcceptedTokens.hashOf(header)
    return hash !== null && this.hashes.has(hash)
  }

  add(hash: string): void {
    // Bounded: past this many distinct tokens, start over (they are re-added on their next use).
    if (this.hashes.size >= 10_000) this.hashes.clear()
    this.hashes.add(hash)
  }

  delete(hash: string): void {
    this.hashes.delete(hash)
  }
}

/**
 * Works out who is asking: a bearer token wins over the session cookie. Sets req.user, req.viewer
 * and req.ability (the shared CASL abilities); anonymous requests get the public abilities.
 * Identities are cached per access version, so a revoked token or a changed membership takes
 * effect on the very next request, whichever process made the change.
 */
export function authenticate(
  accessVersion: AccessVersionReader,
  accepted = new AcceptedTokens(),
  /** Token expiry and embargo ends are judged by this clock (tests inject theirs). */
  clock: () => Date = () => new Date(),
): RequestHandler {
  const cache = new VersionedCache<Identity | null>(5000)
  const publicAbility = { second: -1, value: defineAbilityFor(null) }
  const bearerKey = (header: string) => {
    const hash = AcceptedTokens.hashOf(header)
    if (!hash) throw new UnauthorizedError('The Authorization header must be "Bearer <token>".')
    return `token:${hash}`
  }
  /** assertUsable, keeping the accepted tokens in step with its verdict. */
  function checkToken(
    key: string,
    identity: Identity | null,
    now: number,
  ): asserts identity is Identity {
    try {
      assertUsable(identity, now)
    } catch (error) {
      accepted.delete(key.slice(6))
      throw error
    }
    accepted.add(key.slice(6))
  }
  const settle = (req: Request, identity: Identity | null, method: AuthMethod, now: number) => {
    req.authMethod = identity ? method : null
    req.user = identity?.user ?? null
    req.viewer = identity?.viewer ?? null
    req.ability = abilityAt(identity, now, publicAbility)
  }

  /** The answer from the cache alone, or undefined when the database must be asked. */
  const fromCache = (req: Request, version: number, now: number) => {
    const header = req.get('authorization')
    if (header !== undefined) {
      const key = bearerKey(header)
      const identity = cache.get(key, version)
      if (!identity) return undefined
      checkToken(key, identity, now)
      return lastUseDue(identity, now) ? undefined : { identity, method: 'token' as const }
    }
    const sessionUser = req.session?.userId
    if (!sessionUser) return { identity: null, method: null }
    const identity = cache.get(`session:${sessionUser}`, version)
    return identity ? { identity, method: 'session' as const } : undefined
  }

  const fromDatabase = async (req: Request, version: number, now: number) => {
    const header = req.get('authorization')
    if (header !== undefined) {
      const key = bearerKey(header)
      let identity = cache.get(key, version) ?? null
      if (!identity) {
        identity = await tokenIdentity(requestEm(), key.slice(6), now)
        if (identity) cache.set(key, version, identity)
      }
      checkToken(key, identity, now)
      if (lastUseDue(identity, now)) {
        identity.lastUsedWrite = now
        await requestEm().nativeUpdate(
          ApiToken,
          { id: identity.tokenId },
          { lastUsedAt: new Date(now) },
        )
      }
      return settle(req, identity, 'token', now)
    }
    const sessionUser = req.session?.userId
    let identity: Identity | null = null
    if (sessionUser) {
      const key = `session:${sessionUser}`
      identity = cache.get(key, version) ?? null
      if (!identity) {
        const em = requestEm()
        identity = await identityFor(em, await em.findOne(User, { id: sessionUser }))
        if (identity) cache.set(key, version, identity)
      }
    }
    settle(req, identity, 'session', now)
  }

  // Most requests are answered from the cache; they stay synchronous (no promise, no extra turn).
  return (req, _res, next) => {
    const now = clock().getTime()
    const version = accessVersion.readNow()
    const cached = version === null ? undefined : fromCache(req, version, now)
    if (cached) {
      req.accessVersion = version!
      settle(req, cached.identity, cached.method, now)
      return next()
    }
    return (async () => {
      const current = version ?? (await accessVersion.read())
      req.accessVersion = current
      await fromDatabase(req, current, now)
      next()
    })()
  }
}

/** For routes that make no sense signed out (401 rather than a 403 or 404). */
export const requireUser: RequestHandler = (req, _res, next) => {
  if (!req.user) throw new UnauthorizedError()
  next()
}

/** The signed-in user, for handlers behind requireUser. */
export function signedInUser(req: Express.Request): CurrentUser {
  if (!req.user) throw new UnauthorizedError()
  return req.user
}
