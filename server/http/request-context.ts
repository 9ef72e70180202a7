import type { EntityManager } from '@mikro-orm/better-sqlite'
import { RequestContext } from '@mikro-orm/core'
import type { RequestHandler } from 'express'
import type { Orm } from '../db'

/** Gives every request its own EntityManager fork; first in the chain. */
export const requestContext =
  (orm: Orm): RequestHandler =>
  (_req, _res, next) =>
    RequestContext.create(orm.em, next)

/** The current request's EntityManager. */
export function requestEm(): EntityManager {
  const em = RequestContext.getEntityManager()
  if (!em) throw new Error('No request context: is requestContext() mounted before the routes?')
  return em as EntityManager
}
