import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { AppConfig } from '../../config'
import type { Orm } from '../../db'
import type { Logger } from '../../logger'
import { audit } from '../audit/audit.service'
import { notifyDepositor } from '../curation/curation.service'
import { Dataset } from '../datasets/dataset.entity'
import type { Mailer } from '../mail/mailer'
import { DatasetVersion, type IDatasetVersion } from '../versions/dataset-version.entity'
import { publishDoi } from './datacite-client'
import { doiPayload } from './doi-payload'

/** Attempts before a registration is marked failed and waits for a steward's retry. */
export const DOI_MAX_ATTEMPTS = 5
/** Wait before attempt n+1: 30 s, 2 min, 8 min, 32 min (×4 each time). */
export const doiBackoffMs = (attempts: number) => 30_000 * 4 ** Math.max(0, attempts - 1)
/** A registration being sent is leased this long, so an overlapping round never sends it twice. */
const LEASE_MS = 5 * 60_000

export interface DoiRegistrarOptions {
  orm: Orm
  config: Pick<AppConfig, 'publicUrl' | 'datacite'>
  logger: Logger
  mailer: Mailer
  /** The DataCite API base URL (the real service or the local stand-in). */
  url: string
  clock?: () => Date
}

/**
 * Registers the DOIs of approved versions with DataCite. Each version's registration is a
 * durable piece of work in its own row (status, attempts, next attempt, last error): due ones are
 * sent one at a time, a failure is retried with backoff, and after DOI_MAX_ATTEMPTS it is marked
 * failed, listed in the stewards' queue and retried only by hand. A restart resumes where it
 * stopped, so nothing is lost. It is network I/O, not computation, so it runs on the main thread
 * rather than in the job runner's worker threads.
 */
export class DoiRegistrar {
  private timer: NodeJS.Timeout | null = null
  private running: Promise<number> | null = null
  private readonly now: () => Date

  constructor(private readonly o: DoiRegistrarOptions) {
    this.now = o.clock ?? (() => new Date())
  }

  start(everyMs = 5_000): void {
    // A round that fails (the database away) is logged and tried again at the next tick.
    const tick = () =>
      void this.runDue().catch((err: unknown) =>
        this.o.logger.error({ err }, 'DOI registration round failed'),
      )
    this.timer = setInterval(tick, everyMs)
    this.timer.unref()
    tick()
  }

  async stop(): Promise<void> {
    if (this.timer) clearInterval(this.timer)
    await this.running
  }

  /** Sends every registration that is due now; resolves with how many were attempted. */
  runDue(): Promise<number> {
    this.running ??= this.round().finally(() => (this.running = null))
    return this.running
  }

  private async round(): Promise<number> {
    let attempted = 0
    for (;;) {
      const em = this.o.orm.em.fork()
      const now = this.now()
      const version = await em.findOne(
        DatasetVersion,
        { doiStatus: 'pending', doiNextAttemptAt: { $lte: now } },
        { orderBy: { doiNextAttemptAt: 'asc', id: 'asc' } },
      )
      if (!version) return attempted
      attempted++
      version.doiNextAttemptAt = new Date(now.getTime() + LEASE_MS)
      await em.flush()
      try {
        await this.attempt(em, version)
      } catch (err) {
        this.o.logger.error({ err, version: version.label }, 'DOI registration round failed')
        await this.recordFailure(em, version, 'Internal error while preparing the registration')
      }
    }
  }

  private async attempt(em: EntityManager, version: IDatasetVersion) {
    const body = await doiPayload(em, version, this.o.config)
    const outcome = await publishDoi({ ...this.o.config.datacite, url: this.o.url }, body)
    if (!outcome.ok) return this.recordFailure(em, version, outcome.error)
    const now = this.now()
    Object.assign(version, {
      doi: outcome.doi,
      doiStatus: 'registered',
      doiAttempts: version.doiAttempts + 1,
      doiNextAttemptAt: null,
      doiError: null,
      doiFailedAt: null,
    })
    audit(em, null, {
      action: 'doi.register',
      targetType: 'DatasetVersion',
      targetId: version.label,
      details: { doi: outcome.doi },
    })
    await em.flush()
    const dataset = await em.findOneOrFail(Dataset, { id: version.dataset })
    await notifyDepositor(
      em,
      { mailer: this.o.mailer, config: this.o.config as AppConfig },
      dataset,
      `DOI registered for ${version.label}`,
      `Version ${version.label} of "${version.title}" is citable as https://doi.org/${outcome.doi} (registered ${now.toISOString().slice(0, 10)}).`,
    )
  }

  private async recordFailure(em: EntityManager, version: IDatasetVersion, error: string) {
    const now = this.now()
    const attempts = version.doiAttempts + 1
    const givenUp = attempts >= DOI_MAX_ATTEMPTS
    Object.assign(version, {
      doiAttempts: attempts,
      doiError: error,
      doiStatus: givenUp ? 'failed' : 'pending',
      doiNextAttemptAt: givenUp ? null : new Date(now.getTime() + doiBackoffMs(attempts)),
      doiFailedAt: givenUp ? now : null,
    })
    if (givenUp)
      audit(em, null, {
        action: 'doi.fail',
        targetType: 'DatasetVersion',
        targetId: version.label,
        details: { attempts, error },
      })
    await em.flush()
    this.o.logger.info(
      { version: version.label, attempts, error },
      'DOI registration attempt failed',
    )
  }
}

/** A steward's retry of a failed (or still pending) registration: due now, with fresh attempts. */
export function retryDoiRegistration(version: IDatasetVersion, now: Date) {
  Object.assign(version, {
    doiStatus: 'pending',
    doiAttempts: 0,
    doiNextAttemptAt: now,
    doiFailedAt: null,
  })
}
