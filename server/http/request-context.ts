import type { EntityManager } from '@mikro-orm/better-sqlite'
import { RequestContext } from '@mikro-orm/core'
import type { RequestHandler } from 'express'
import type { Orm } from '../db'

/**
 * The request's EntityManager forks, made on first use. MikroORM looks its context up through
 * `map.get(name)`, so a Map that forks on demand is all it takes; requests answered from a cache
 * (the catalogue's pages, cached identities) then never pay for a fork.
 */
class ForksOnDemand extends Map<string, EntityManager> {
  /** fork() itself asks the context for the current manager; it must get the root then. */
  private forking = false

  constructor(private readonly root: EntityManager) {
    super()
  }

  override get(name: string): EntityManager | undefined {
    let fork = super.get(name)
    if (!fork && name === this.root.name && !this.forking) {
      this.forking = true
      try {
        fork = this.root.fork({ useContext: true }) as EntityManager
      } finally {
        this.forking = false
      }
      super.set(name, fork)
    }
    return fork
  }
}

// MikroORM keeps its AsyncLocalStorage private; `RequestContext.create` forks eagerly.
const storage = (RequestContext as unknown as { storage: { run<R>(ctx: unknown, fn: () => R): R } })
  .storage

/** Gives every request its own EntityManager fork (made when first asked for); first in the chain. */
export const requestContext =
  (orm: Orm): RequestHandler =>
  (_req, _res, next) =>
    storage.run(new RequestContext(new ForksOnDemand(orm.em as EntityManager)), next)

/** The current request's EntityManager. */
export function requestEm(): EntityManager {
  const em = RequestContext.getEntityManager()
  if (!em) throw new Error('No request context: is requestContext() mounted before the routes?')
  return em as EntityManager
}
