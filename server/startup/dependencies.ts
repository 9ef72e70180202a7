import { Client } from 'pg'
import type { AppConfig } from '../config'
import type { Logger } from '../logger'
import { createObjectStore, describeStorage, storageProblem } from '../storage/object-storage'

/**
 * Before a node opens its port on the cluster profile, the database and the object store must
 * answer. Each failure is logged in words (which service, where, why) and retried after a
 * doubling pause; after the configured wait the start is given up with one clear message and a
 * non-zero exit, so a supervisor sees a failed start instead of a node that half works, and the
 * process never loops on a stack trace. The embedded default has nothing to wait for.
 */

/** A start that could not happen; main prints only its message (no stack) and exits non-zero. */
export class StartupError extends Error {}

export interface Dependency {
  /** "database PostgreSQL at …", "object store bucket … at …" (no credentials). */
  what: string
  check(): Promise<void>
  /** Why the check failed, in words an operator can act on. */
  problem(err: unknown): string
  close?(): void
}

export interface WaitClock {
  /** Milliseconds; injected so tests need not wait. */
  now(): number
  sleep(ms: number): Promise<void>
}

export interface WaitOptions {
  logger: Logger
  clock: WaitClock
  /** Give up once this long has passed since the first attempt (0: one attempt only). */
  waitMs: number
  firstDelayMs?: number
  maxDelayMs?: number
}

const seconds = (ms: number) => `${Math.max(0, Math.round(ms / 1000))} s`

/** Resolves once the dependency answers; throws StartupError when the wait is over. */
export async function waitForDependency(dep: Dependency, options: WaitOptions): Promise<void> {
  const { logger, clock, waitMs, firstDelayMs = 1000, maxDelayMs = 15_000 } = options
  const deadline = clock.now() + waitMs
  let delay = firstDelayMs
  for (let attempt = 1; ; attempt++) {
    try {
      await dep.check()
      if (attempt > 1) logger.info({ attempt }, `the ${dep.what} answers now`)
      return
    } catch (err) {
      const problem = dep.problem(err)
      const left = deadline - clock.now()
      if (left <= 0)
        throw new StartupError(
          `Stipple did not start: the ${dep.what} is not usable: ${problem}. ` +
            (waitMs > 0
              ? `Gave up after ${seconds(waitMs)} (STARTUP_WAIT_SECONDS sets how long to wait).`
              : 'STARTUP_WAIT_SECONDS=0, so it was tried once.'),
        )
      const pause = Math.min(delay, left)
      logger.error(
        { attempt, retryInSeconds: pause / 1000, givingUpInSeconds: Math.round(left / 1000) },
        `the ${dep.what} is not usable: ${problem}; trying again in ${seconds(pause)}`,
      )
      await clock.sleep(pause)
      delay = Math.min(delay * 2, maxDelayMs)
    }
  }
}

/** Where a PostgreSQL URL points, without its password. */
export function describeDatabase(url: string): string {
  try {
    const u = new URL(url)
    const user = u.username ? ` as ${decodeURIComponent(u.username)}` : ''
    return `database PostgreSQL at ${u.hostname}:${u.port || 5432}${u.pathname}${user}`
  } catch {
    return 'database PostgreSQL (DATABASE_URL)'
  }
}

/** Why PostgreSQL did not answer, in words (the driver's codes and SQLSTATEs). */
export function databaseProblem(err: unknown): string {
  const e = err as { code?: string; errors?: { code?: string }[]; message?: string }
  const code = e.code ?? e.errors?.[0]?.code
  switch (code) {
    case 'ECONNREFUSED':
      return 'nothing answers at that address (connection refused)'
    case 'ENOTFOUND':
    case 'EAI_AGAIN':
      return 'the host name does not resolve'
    case 'ETIMEDOUT':
      return 'the connection timed out'
    case 'ECONNRESET':
      return 'the server closed the connection'
    case '28P01':
      return 'the password was refused (check DATABASE_URL)'
    case '28000':
      return 'the server refuses this user (check the user in DATABASE_URL and pg_hba.conf)'
    case '3D000':
      return 'the database does not exist (create it, or correct DATABASE_URL)'
    case '57P03':
      return 'the server is starting up or shutting down'
    case '53300':
      return 'the server has no free connections'
  }
  if (/timeout/i.test(e.message ?? '')) return 'the connection timed out'
  return `it answered with an error (${code ?? 'no code'})`
}

function databaseDependency(url: string): Dependency {
  return {
    what: describeDatabase(url),
    problem: databaseProblem,
    async check() {
      const client = new Client({ connectionString: url, connectionTimeoutMillis: 5000 })
      // A refused connection also emits 'error' on the client; connect() reports it.
      client.on('error', () => undefined)
      try {
        await client.connect()
        await client.query('select 1')
      } finally {
        await client.end().catch(() => undefined)
      }
    },
  }
}

/** The services this configuration needs before it may serve. */
export function dependenciesOf(config: AppConfig): Dependency[] {
  const deps: Dependency[] = []
  if (config.database.driver === 'postgresql') deps.push(databaseDependency(config.database.url))
  if (config.storage.kind === 's3') {
    const store = createObjectStore(config.storage, config.dataDir)
    deps.push({
      what: `object store ${describeStorage(config.storage, config.dataDir)}`,
      problem: storageProblem,
      check: () => store.ping(),
      close: () => store.close?.(),
    })
  }
  return deps
}

export const realClock: WaitClock = {
  now: () => Date.now(),
  sleep: (ms) => new Promise((resolve) => setTimeout(resolve, ms)),
}

/** Waits for each dependency in turn, sharing one deadline. */
export async function waitForDependencies(
  config: AppConfig,
  logger: Logger,
  clock: WaitClock = realClock,
): Promise<void> {
  const deadline = clock.now() + config.startupWaitMs
  for (const dep of dependenciesOf(config)) {
    try {
      await waitForDependency(dep, {
        logger,
        clock,
        waitMs: Math.max(0, deadline - clock.now()),
      })
    } finally {
      dep.close?.()
    }
  }
}
