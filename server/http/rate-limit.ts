import cluster from 'node:cluster'
import { ClusterMemoryStoreWorker } from '@express-rate-limit/cluster-memory-store'
import type { RequestHandler } from 'express'
import {
  rateLimit,
  type Options,
  type RateLimitRequestHandler,
  type Store,
} from 'express-rate-limit'
import { HttpError } from '../errors/http-error'
import type { AcceptedTokens } from './authenticate'

/**
 * Where the counts of app nodes on several machines live (PostgreSQL, server/coordination), set
 * once at start before the app is built. Process-wide like node:cluster's role, which picks the
 * IPC store below: both say how this process shares its counts, not how one limiter behaves.
 */
let sharedStore: ((name: string) => Store) | null = null

export function countRateLimitsIn(store: ((name: string) => Store) | null): void {
  sharedStore = store
}

function storeFor(name: string): Store | undefined {
  if (sharedStore) return sharedStore(name)
  return cluster.isWorker ? new ClusterMemoryStoreWorker({ prefix: name }) : undefined
}

/**
 * A per-address limit of `limit` requests a minute, with the standard RateLimit headers. In an
 * HTTP worker of a multi-process Stipple the counts live in the primary (the rate-limit package's
 * cluster store), and on app nodes sharing PostgreSQL in the database, so the limit holds for the
 * whole server, not per process. `name` keeps the
 * limiters' counts apart there.
 */
export function perMinuteLimit(
  name: string,
  limit: number,
  options: Partial<
    Pick<Options, 'skip' | 'requestWasSuccessful' | 'skipSuccessfulRequests' | 'keyGenerator'>
  > = {},
): RateLimitRequestHandler {
  return rateLimit({
    windowMs: 60_000,
    limit,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    ...options,
    handler: (_req, _res, next) =>
      next(
        new HttpError(
          429,
          'Too many requests',
          'Too many attempts from your address; wait a minute and try again.',
          '/problems/too-many-requests',
        ),
      ),
    store: storeFor(name),
  })
}

/**
 * Guessing tokens: requests with an Authorization header count against the sign-in limit only
 * when they are turned away as unauthenticated (401), so scripts with a good token are never slowed.
 * Tokens this process already accepted skip the limiter's bookkeeping altogether (AcceptedTokens).
 */
export function failedTokenLimit(limit: number, accepted: AcceptedTokens): RequestHandler {
  const limiter = perMinuteLimit('bearer-failures', limit, {
    skipSuccessfulRequests: true,
    requestWasSuccessful: (_req, res) => res.statusCode !== 401,
  })
  // Decided before the limiter: its handler is async and resolves the client address even for
  // requests it then skips, a measurable share of a cheap cached list request.
  return (req, res, next) =>
    req.headers.authorization === undefined || accepted.has(req.headers.authorization)
      ? next()
      : void limiter(req, res, next)
}
