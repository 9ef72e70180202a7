/** Network failures: the database or the bucket is not there (or went away mid-request). */
const GONE_CODES = new Set([
  'ECONNREFUSED',
  'ECONNRESET',
  'ETIMEDOUT',
  'EPIPE',
  'EHOSTUNREACH',
  'ENOTFOUND',
  'EAI_AGAIN',
  // PostgreSQL: the server shut down or restarts; the connection failed (SQLSTATE class 08).
  '57P01',
  '57P02',
  '57P03',
  '08000',
  '08001',
  '08003',
  '08006',
])
const GONE_NAMES = new Set(['TimeoutError', 'KnexTimeoutError', 'ConnectionException'])
/** pg and knex say so in words only, without a code. */
const GONE_MESSAGES = /Connection terminated|Timeout acquiring a connection|connection is closed/i

interface Fault {
  code?: unknown
  name?: unknown
  message?: unknown
  cause?: unknown
  $metadata?: { httpStatusCode?: number }
}

/**
 * Whether an upload request failed because the database or the object store could not be
 * reached, rather than because of the request: a tus client told 503 tries again later and
 * resumes from the offset it is given then, so an outage pauses an upload instead of ending it.
 */
export function isDependencyUnavailable(err: unknown): boolean {
  let fault = err as Fault | undefined
  for (let depth = 0; fault && typeof fault === 'object' && depth < 5; depth++) {
    if (typeof fault.code === 'string' && GONE_CODES.has(fault.code)) return true
    if (typeof fault.name === 'string' && GONE_NAMES.has(fault.name)) return true
    if (typeof fault.message === 'string' && GONE_MESSAGES.test(fault.message)) return true
    // The bucket answered, but with a server error of its own (S3 says "slow down" with a 503).
    if ((fault.$metadata?.httpStatusCode ?? 0) >= 500) return true
    // AggregateError (a connection refused on every address) keeps the real ones in `errors`.
    const inner = (fault as { errors?: unknown[] }).errors
    if (Array.isArray(inner) && inner.some((e) => isDependencyUnavailable(e))) return true
    fault = fault.cause as Fault | undefined
  }
  return false
}
