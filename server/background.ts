import type { AppConfig } from './config'
import type { Orm } from './db'
import { refreshPlannerStatistics } from './db'
import { createJobRunner, type BackgroundJobs } from './jobs/background-jobs'
import { FRESH_THREAD_KINDS } from './jobs/kinds'
import type { Logger } from './logger'
import { queueMissingFileJobs } from './modules/files/file-jobs'
import { fileJobCompletions } from './modules/files/file-jobs.completions'
import { sweepStoredBytes } from './modules/files/orphan-sweep.service'
import { recountDerivedBytes } from './modules/files/project-usage'
import { pruneOidcPayloads } from './modules/idp/oidc-adapter'
import { startDoiRegistration } from './modules/doi/doi-background'
import { qualityCompletions } from './modules/quality/quality.completions'
import { startMailCatcher, type MailCatcher } from './modules/mail/mail-catcher'
import { mailerOrLog } from './modules/mail/mailer'
import { createEmbargoScheduler, type Clock } from './modules/embargo/embargo-scheduler'
import { OrmSessionStore } from './modules/sessions/session-store'
import type { Uploads } from './modules/uploads/uploads'
import type { Coordination } from './coordination/coordination'
import { DEMO_DIR } from './paths'
import { seedDemoReview } from './seeders/demo-review.seeder'
import { seedDemo } from './seeders/demo.seeder'
import { seedDemoTables } from './seeders/demo-tables'
import type { LocalStorage } from './storage/local-storage'

export interface Background {
  /** Demo mode: the local SMTP server every process sends to. */
  mailCatcher: MailCatcher | null
  jobs: BackgroundJobs
  /** Finishes interrupted uploads, then starts the jobs and the hourly upkeep. */
  begin(uploads: Pick<Uploads, 'reconcile' | 'expire'>): Promise<void>
  stop(): Promise<void>
}

/**
 * The work one process does for the whole server: demo data, the mail catcher, the job runner,
 * registering uploads a crash interrupted, and the hourly upkeep. A single-process Stipple runs
 * it beside its HTTP server; with several HTTP workers the primary runs it (server/cluster).
 */
export async function openBackground(deps: {
  config: AppConfig
  orm: Orm
  logger: Logger
  storage: LocalStorage
  /** The scheduler's time (tests pass their own). */
  clock?: Clock
  /** App nodes sharing PostgreSQL: schedules tick on one node only, one node seeds at a time. */
  coordination?: Coordination | null
}): Promise<Background> {
  const { config, orm, logger, storage } = deps
  const clock = deps.clock ?? (() => new Date())
  const seed = async () => {
    const { created } = await seedDemo(orm.em.fork(), DEMO_DIR)
    if (created) logger.info({ created }, 'demo data seeded')
    await seedDemoReview(orm.em.fork(), config)
  }
  if (config.demo) await (deps.coordination ? deps.coordination.oneAtATime(seed) : seed())
  const mailCatcher = config.demo ? await startMailCatcher() : null
  const jobs = createJobRunner({
    orm,
    logger,
    dataDir: config.dataDir,
    storage: config.storage,
    workers: config.jobWorkers,
    completions: { ...fileJobCompletions(config), ...qualityCompletions() },
    freshThreadKinds: FRESH_THREAD_KINDS,
  })
  let upkeep: NodeJS.Timeout | null = null
  let doi: Awaited<ReturnType<typeof startDoiRegistration>> | null = null
  let catchUp: Promise<void> = Promise.resolve()
  // The demo tables are written one after another after start; a stop ends that between two.
  const stopping = new AbortController()
  let demoTables: Promise<unknown> = Promise.resolve()
  const embargoes = createEmbargoScheduler({
    orm,
    logger,
    config,
    mailer: mailerOrLog(mailCatcher?.url ?? config.smtpUrl, config.mailFrom, logger),
    clock,
    oncePerTick: deps.coordination
      ? (at, work) => deps.coordination!.oncePerTick('embargo', at, work)
      : undefined,
  })

  return {
    mailCatcher,
    jobs,
    async begin(uploads) {
      const completed = await uploads.reconcile()
      if (completed) logger.info({ completed }, 'interrupted uploads registered')
      await recountDerivedBytes(orm.em.fork(), storage)
      const requeued = await queueMissingFileJobs(orm.em.fork(), config)
      if (requeued) logger.info({ requeued }, 'files without their processing job requeued')
      const sweep = () =>
        sweepStoredBytes(orm.em.fork(), storage, {
          now: clock(),
          oncePerTick: deps.coordination
            ? (at, work) => deps.coordination!.oncePerTick('orphan-sweep', at, work)
            : undefined,
        }).then((removed) => {
          if (removed.originals + removed.derived + removed.uploads)
            logger.info({ removed }, 'bytes without a record removed')
        })
      await sweep()
      jobs.start()
      doi = await startDoiRegistration({ ...deps, smtpUrl: mailCatcher?.url ?? config.smtpUrl })
      // Demo tables are simulated after the server is up, one at a time, then read like uploads.
      if (config.demoTables)
        demoTables = seedDemoTables(
          orm.em.fork(),
          storage,
          () => jobs.notify(),
          undefined,
          stopping.signal,
        ).then(
          (tables) => tables && logger.info({ tables }, 'demo localization tables deposited'),
          (err: unknown) => logger.error({ err }, 'demo localization tables failed'),
        )
      const sessions = new OrmSessionStore(orm)
      const hourly = () =>
        Promise.all([
          sessions.prune(),
          pruneOidcPayloads(orm),
          refreshPlannerStatistics(orm),
          uploads.expire(),
          sweep(),
          deps.coordination?.prune(),
        ]).catch((err: unknown) => logger.error({ err }, 'hourly upkeep failed'))
      upkeep = setInterval(() => void hourly(), 3600_000)
      upkeep.unref()
      // Releases missed while the server was down happen now, then once a minute. Start-up does
      // not wait for them: each release mails several people, which takes seconds.
      catchUp = embargoes
        .start()
        .then(() => undefined)
        .catch((err: unknown) => logger.error({ err }, 'embargo catch-up failed'))
    },
    async stop() {
      stopping.abort()
      embargoes.stop()
      // A catch-up still mailing gets a few seconds to finish; its records are already written.
      await Promise.race([catchUp, new Promise((r) => setTimeout(r, 3000).unref())])
      if (upkeep) clearInterval(upkeep)
      await demoTables
      await jobs.stop()
      await doi?.stop()
      await mailCatcher?.stop()
    },
  }
}
