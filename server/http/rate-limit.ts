import cluster from 'node:cluster'
import { ClusterMemoryStoreWorker } from '@express-rate-limit/cluster-memory-store'
import { rateLimit, type RateLimitRequestHandler } from 'express-rate-limit'

/**
 * A per-address limit of `limit` requests a minute, with the standard RateLimit headers. In an
 * HTTP worker of a multi-process Stipple the counts live in the primary (the rate-limit package's
 * cluster store), so the limit holds for the whole server, not per process. `name` keeps the
 * limiters' counts apart there.
 */
export function perMinuteLimit(name: string, limit: number): RateLimitRequestHandler {
  return rateLimit({
    windowMs: 60_000,
    limit,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    ...(cluster.isWorker ? { store: new ClusterMemoryStoreWorker({ prefix: name }) } : {}),
  })
}
