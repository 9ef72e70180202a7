import cluster, { type Worker } from 'node:cluster'
import { ClusterMemoryStorePrimary } from '@express-rate-limit/cluster-memory-store'
import { openBackground } from '../background'
import type { AppConfig } from '../config'
import { openDatabase } from '../db'
import { openCoordination } from '../coordination/coordination'
import { createLogger, type Logger } from '../logger'
import { loadAccounts, type DemoAccount } from '../modules/idp/accounts'
import { signingKey } from '../modules/idp/signing-key'
import { createUploads } from '../modules/uploads/uploads'
import { DEMO_DIR } from '../paths'
import { openNodeStorage } from '../storage/object-storage'
import { LockBroker } from './lock-broker'
import { isStippleMessage, type ToPrimary, type ToWorker } from './messages'

export interface RunningPrimary {
  url: string
  config: AppConfig
  logger: Logger
  accounts: DemoAccount[]
  stop(): Promise<void>
}

/** More exits than this within a minute means the workers cannot run; the primary gives up. */
const CRASHES_PER_MINUTE = 5
const STOP_GRACE_MS = 10_000

function sendTo(worker: Worker | undefined, message: ToWorker) {
  if (worker?.isConnected()) worker.send(message)
}

/**
 * The primary of a multi-process Stipple (WEB_CONCURRENCY > 1). It prepares what must exist
 * once (migrations, demo data, the identity provider's key), runs the background work (jobs,
 * mail catcher, upkeep), holds the upload locks and the rate-limit counts for all workers, and
 * keeps config.httpWorkers HTTP workers running, starting a new one when one dies. It serves no
 * HTTP itself; node:cluster hands each new connection to a worker in turn.
 */
export async function startPrimary(config: AppConfig): Promise<RunningPrimary> {
  const logger = createLogger(config.logLevel)
  const orm = await openDatabase(config.database)
  const storage = openNodeStorage(config)
  const accounts = config.demo || config.oidc.local ? loadAccounts(`${DEMO_DIR}/accounts.json`) : []
  if (config.oidc.local) await signingKey(config.dataDir)
  // On PostgreSQL the workers coordinate through the database themselves; the primary's
  // schedules still tick once across every host's primary.
  const coordination = await openCoordination(config, logger)
  // The demo's reviewer links are signed with the secret the workers agree on.
  const shared = (await coordination?.agreedSecrets(config))?.config ?? config
  const background = await openBackground({ config: shared, orm, logger, storage, coordination })
  const uploads = createUploads({
    orm,
    config,
    logger,
    storage,
    onRegistered: () => background.jobs.notify(),
  })
  await background.begin(uploads)

  new ClusterMemoryStorePrimary().init()
  const broker = new LockBroker((owner, message) => sendTo(cluster.workers?.[owner], message))
  const listening = new Set<number>()
  let started = false
  let stopping = false
  let ready!: (url: string) => void
  let failed!: (err: Error) => void
  const everyoneListening = new Promise<string>((resolve, reject) => {
    ready = resolve
    failed = reject
  })

  cluster.on('message', (worker, message: unknown) => {
    if (!isStippleMessage<ToPrimary>(message) || broker.handle(worker.id, message)) return
    if (message.stipple === 'jobs-notify') background.jobs.notify()
    // Comments and regions reach every worker's open event streams (server/modules/events).
    else if (message.stipple === 'dataset-event')
      for (const w of Object.values(cluster.workers ?? {})) sendTo(w, message)
    else if (message.stipple === 'mail-list')
      sendTo(worker, {
        stipple: 'mail-list',
        ask: message.ask,
        items: background.mailCatcher?.messages ?? [],
      })
    else if (message.stipple === 'listening' && !started) {
      listening.add(worker.id)
      if (listening.size === config.httpWorkers) {
        started = true
        ready(message.url)
      }
    }
  })

  // Workers read the environment as the primary did; they send mail to the primary's catcher.
  const workerEnv = background.mailCatcher ? { SMTP_URL: background.mailCatcher.url } : {}
  const exits: number[] = []
  cluster.on('exit', (worker, code, signal) => {
    broker.forgetWorker(worker.id)
    if (stopping) return
    // At start-up a worker that cannot start means Stipple cannot; later, it is replaced.
    if (!started) return failed(new Error(`An HTTP worker could not start (exit code ${code}).`))
    const now = Date.now()
    exits.push(now)
    while (exits[0]! < now - 60_000) exits.shift()
    logger.error({ pid: worker.process.pid, code, signal }, 'an HTTP worker stopped')
    if (exits.length > CRASHES_PER_MINUTE) {
      logger.error({ exits: exits.length }, 'HTTP workers keep stopping; Stipple shuts down')
      void stop().then(() => process.exit(1))
      return
    }
    cluster.fork(workerEnv)
  })
  // With a worker per core, V8's parallel and concurrent GC threads can only take time from the
  // other workers (measured here with two workers: 383–398 µs of CPU per list request instead of
  // 414–505, p95 25–27 ms instead of 26–31), so each worker collects on its own thread.
  cluster.setupPrimary({ execArgv: [...process.execArgv, '--single-threaded-gc'] })
  for (let i = 0; i < config.httpWorkers; i++) cluster.fork(workerEnv)

  async function stop() {
    if (stopping) return
    stopping = true
    const workers = Object.values(cluster.workers ?? {}).filter((w): w is Worker => !!w)
    await Promise.all(
      workers.map(
        (w) =>
          new Promise<void>((resolve) => {
            if (w.isDead()) return resolve()
            // A worker finishes its requests in flight on SIGTERM (server/main.ts); it is cut
            // short only after the grace period.
            const force = setTimeout(() => w.process.kill('SIGKILL'), STOP_GRACE_MS)
            w.once('exit', () => (clearTimeout(force), resolve()))
            w.process.kill('SIGTERM')
          }),
      ),
    )
    await background.stop()
    await uploads.close()
    await coordination?.close()
    await orm.close()
  }

  let url: string
  try {
    url = await everyoneListening
  } catch (err) {
    await stop()
    throw err
  }
  return {
    url,
    config,
    logger,
    accounts,
    stop,
  }
}
