import type { JWK } from 'jose'
import pg from 'pg'
import type { Store } from 'express-rate-limit'
import { loadLocalSecrets, type AppConfig } from '../config'
import type { Logger } from '../logger'
import { signingKey } from '../modules/idp/signing-key'
import { PgEventRelay } from './pg-event-relay'
import { PgRateLimitStore, pruneRateLimits } from './pg-rate-limit-store'
import { PgSession } from './pg-session'
import { runOncePerTick } from './pg-tick-claim'
import { PgUploadLocker } from './pg-upload-locker'
import { agreedSecret } from './shared-secrets'
import { whileHoldingStartupLock } from './pg-startup-lock'

/** What a node shares with the others when several run on one PostgreSQL database. */
export interface Coordination {
  uploadLocker: PgUploadLocker
  events: PgEventRelay
  rateLimitStore(name: string): Store
  /** Runs a schedule's tick on one node only (null on the others). */
  oncePerTick<T>(schedule: string, at: Date, work: () => Promise<T>): Promise<T | null>
  /** The secrets all nodes must agree on, where the environment named none. */
  agreedSecrets(config: AppConfig): Promise<AgreedSecrets>
  /** Start-up work (demo seeding) that nodes starting together must do one after the other. */
  oneAtATime<T>(work: () => Promise<T>): Promise<T>
  /** Hourly: drops rate-limit windows that ended. */
  prune(): Promise<number>
  close(): Promise<void>
}

export interface AgreedSecrets {
  config: AppConfig
  idpCookieKey: string
  /** The stand-in identity provider's key (null when a real provider is configured). */
  idpSigningKey: JWK | null
}

/**
 * Cross-node coordination on the PostgreSQL profile (DATABASE_URL): upload locks, rate-limit
 * counts, dataset events, once-per-tick schedules and shared secrets, each through PostgreSQL
 * so any number of app nodes on any machines behave as one server. The embedded SQLite profile
 * gets null and keeps its in-process (or node:cluster IPC) ways.
 */
export async function openCoordination(
  config: AppConfig,
  logger: Logger,
): Promise<Coordination | null> {
  if (config.database.driver !== 'postgresql') return null
  const url = config.database.url
  const pool = new pg.Pool({ connectionString: url, max: 4, application_name: 'stipple-nodes' })
  pool.on('error', (err) => logger.error({ err }, 'a coordination connection failed'))
  const session = new PgSession(url, logger)
  const notify = (channel: string, payload: string) =>
    pool.query('select pg_notify($1, $2)', [channel, payload])
  const uploadLocker = new PgUploadLocker(session, notify)
  const events = new PgEventRelay(session, pool, logger)
  await uploadLocker.start()
  await events.start()

  return {
    uploadLocker,
    events,
    rateLimitStore: (name) => new PgRateLimitStore(pool, name),
    oncePerTick: (schedule, at, work) => runOncePerTick(pool, schedule, at, work),
    async agreedSecrets(cfg) {
      const local = loadLocalSecrets(cfg.dataDir)
      const fromFile = cfg.sessionSecrets[0] === local.sessionSecret
      const sessionSecret = fromFile
        ? await agreedSecret(pool, 'session', local.sessionSecret)
        : cfg.sessionSecrets[0]!
      const clientSecret = cfg.oidc.local
        ? await agreedSecret(pool, 'idp-client', cfg.oidc.clientSecret)
        : cfg.oidc.clientSecret
      return {
        config: {
          ...cfg,
          sessionSecrets: [sessionSecret, ...cfg.sessionSecrets.slice(1)],
          oidc: { ...cfg.oidc, clientSecret },
        },
        idpCookieKey: await agreedSecret(pool, 'idp-cookie', local.idpCookieKey),
        idpSigningKey: cfg.oidc.local
          ? (JSON.parse(
              await agreedSecret(
                pool,
                'idp-signing-key',
                JSON.stringify(await signingKey(cfg.dataDir)),
              ),
            ) as JWK)
          : null,
      }
    },
    oneAtATime: (work) => whileHoldingStartupLock(url, work),
    prune: () => pruneRateLimits(pool),
    async close() {
      await session.close()
      await pool.end()
    },
  }
}
