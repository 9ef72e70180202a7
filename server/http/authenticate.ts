import type { RequestHandler } from 'express'
import { defineAbilityFor } from '@shared/permissions/abilities'
import { UnauthorizedError } from '../errors/http-error'
import { requestEm } from './request-context'
import { userForToken } from '../modules/tokens/tokens.service'
import { User, type IUser } from '../modules/users/user.entity'
import { loadViewer } from '../modules/users/viewer.service'

/**
 * Works out who is asking: a bearer token wins over the session cookie. Sets req.user, req.viewer
 * and req.ability (the shared CASL abilities); anonymous requests get the public abilities.
 */
export function authenticate(): RequestHandler {
  return async (req, _res, next) => {
    const em = requestEm()
    let user: IUser | null = null
    req.authMethod = null
    const header = req.get('authorization')
    if (header !== undefined) {
      const match = /^Bearer\s+(\S+)$/i.exec(header)
      if (!match?.[1]) throw new UnauthorizedError('The Authorization header must be "Bearer <token>".')
      user = await userForToken(em, match[1])
      if (!user) throw new UnauthorizedError('That token is unknown, revoked or expired.')
      req.authMethod = 'token'
    } else if (req.session?.userId) {
      user = await em.findOne(User, { id: req.session.userId })
      if (user) req.authMethod = 'session'
    }
    req.user = user
    req.viewer = user ? await loadViewer(em, user) : null
    req.ability = defineAbilityFor(req.viewer)
    next()
  }
}

/** For routes that make no sense signed out (401 rather than a 403 or 404). */
export const requireUser: RequestHandler = (req, _res, next) => {
  if (!req.user) throw new UnauthorizedError()
  next()
}

/** The signed-in user, for handlers behind requireUser. */
export function signedInUser(req: Express.Request): IUser {
  if (!req.user) throw new UnauthorizedError()
  return req.user
}
