import { createServer, type Server } from 'node:http'
import type { AddressInfo } from 'node:net'
import type { Express } from 'express'
import { createApp } from './app'
import type { AppConfig } from './config'
import { loadLocalSecrets } from './config'
import type { Locker } from '@tus/server'
import { openBackground } from './background'
import { openDatabase, type Orm } from './db'
import { createLogger, type Logger } from './logger'
import { createRelyingParty } from './modules/auth/relying-party'
import { loadAccounts, type DemoAccount } from './modules/idp/accounts'
import { createLocalProvider } from './modules/idp/local-provider'
import type { Mailbox, MailCatcher } from './modules/mail/mail-catcher'
import { mailerOrLog } from './modules/mail/mailer'
import { DEMO_DIR } from './paths'
import type { BackgroundJobs } from './jobs/background-jobs'
import type { Uploads } from './modules/uploads/uploads'
import { objectStorageReady, openNodeStorage } from './storage/object-storage'
import { openCoordination } from './coordination/coordination'
import { countRateLimitsIn } from './http/rate-limit'

export interface RunningStipple {
  url: string
  server: Server
  app: Express
  orm: Orm
  config: AppConfig
  logger: Logger
  mailCatcher: MailCatcher | null
  accounts: DemoAccount[]
  /** Null in an HTTP worker: the primary runs the jobs. */
  jobs: BackgroundJobs | null
  stop(): Promise<void>
}

/**
 * What an HTTP worker of a multi-process Stipple (server/cluster) uses from the primary instead
 * of running it itself: the job runner, the caught mail and the upload locks.
 */
export interface PrimaryLink {
  jobs: { notify(): void }
  mailbox: Mailbox | null
  uploadLocker: Locker
}

export interface StartOptions {
  clientDir?: string
  /** Set in an HTTP worker: the demo data, mail catcher, jobs and upkeep are the primary's. */
  primary?: PrimaryLink
}

const listen = (server: Server, port: number, host: string) =>
  new Promise<void>((resolve, reject) => {
    server.once('error', reject)
    server.listen(port, host, () => resolve())
  })

/**
 * Starts the whole embedded application: database, demo data, mail catcher, the stand-in
 * identity provider when no real one is configured, and the HTTP server. Tests call this with
 * port 0; server/main.ts calls it with the configured port.
 */
export async function startStipple(
  config: AppConfig,
  options: StartOptions = {},
): Promise<RunningStipple> {
  const logger = createLogger(config.logLevel)
  // Requests that arrive while Stipple starts wait for it rather than get an error: a resumable
  // upload client takes any error answer to its offset query as "start the upload over".
  let handOver!: (app: Express) => void
  let giveUp!: (err: unknown) => void
  const ready = new Promise<Express>((resolve, reject) => ((handOver = resolve), (giveUp = reject)))
  ready.catch(() => undefined)
  const server = createServer((req, res) => {
    ready.then(
      (app) => app(req, res),
      () => res.writeHead(503).end('Stipple could not start'),
    )
  })
  await listen(server, config.port, config.host)
  try {
    const running = await startOn(server, config, options, logger)
    handOver(running.app) // the requests that waited
    server.removeAllListeners('request')
    server.on('request', running.app)
    return running
  } catch (err) {
    giveUp(err)
    server.close()
    throw err
  }
}

async function startOn(
  server: Server,
  config: AppConfig,
  options: StartOptions,
  logger: Logger,
): Promise<RunningStipple> {
  const { port } = server.address() as AddressInfo
  // With port 0 the operating system picks the port, so the public URL is only known now.
  const publicUrl = config.port === 0 ? `http://${config.host}:${port}` : config.publicUrl
  const { primary } = options
  await objectStorageReady(config, logger)

  const orm = await openDatabase(config.database)
  // App nodes on PostgreSQL share locks, counts, events, schedules and secrets through it.
  const coordination = await openCoordination(config, logger)
  countRateLimitsIn(coordination ? (name) => coordination.rateLimitStore(name) : null)
  const agreed = await coordination?.agreedSecrets({ ...config, port, publicUrl })
  const cfg: AppConfig = agreed?.config ?? { ...config, port, publicUrl }
  const storage = openNodeStorage(cfg)
  const accounts = cfg.demo || cfg.oidc.local ? loadAccounts(`${DEMO_DIR}/accounts.json`) : []
  const background = primary
    ? null
    : await openBackground({ config: cfg, orm, logger, storage, coordination })
  const smtpUrl = background?.mailCatcher?.url ?? cfg.smtpUrl
  const mailer = mailerOrLog(smtpUrl, cfg.mailFrom, logger)

  const issuer = cfg.oidc.issuer ?? `${publicUrl}/oidc`
  const localIdp = cfg.oidc.local
    ? {
        accounts,
        provider: await createLocalProvider({
          issuer,
          publicUrl,
          clientId: cfg.oidc.clientId,
          clientSecret: cfg.oidc.clientSecret,
          accounts,
          dataDir: cfg.dataDir,
          cookieKeys: [agreed?.idpCookieKey ?? loadLocalSecrets(cfg.dataDir).idpCookieKey],
          signingKey: agreed?.idpSigningKey ?? undefined,
          orm,
        }),
      }
    : undefined
  const relyingParty = createRelyingParty({
    issuer,
    clientId: cfg.oidc.clientId,
    clientSecret: cfg.oidc.clientSecret,
    publicUrl,
  })
  const app = createApp({
    orm,
    config: { ...cfg, oidc: { ...cfg.oidc, issuer } },
    mailer,
    logger,
    relyingParty,
    localIdp,
    mailbox: primary ? (primary.mailbox ?? undefined) : (background?.mailCatcher ?? undefined),
    clientDir: options.clientDir,
    storage,
    jobs: primary?.jobs ?? background!.jobs,
    uploadLocker: coordination?.uploadLocker ?? primary?.uploadLocker,
    eventRelay: coordination?.events,
  })
  const uploads = app.locals.uploads as Uploads
  await background?.begin(uploads)

  return {
    url: publicUrl,
    server,
    app,
    orm,
    config: cfg,
    logger,
    mailCatcher: background?.mailCatcher ?? null,
    accounts,
    jobs: background?.jobs ?? null,
    async stop() {
      // Finish the requests in flight, then close; stragglers are cut after a grace period.
      const closed = new Promise<void>((resolve) => server.close(() => resolve()))
      server.closeIdleConnections()
      const force = setTimeout(() => server.closeAllConnections(), 5000)
      await closed
      clearTimeout(force)
      await background?.stop()
      await uploads.close()
      ;(app.locals.close as () => void)()
      await coordination?.close()
      await orm.close()
    },
  }
}
