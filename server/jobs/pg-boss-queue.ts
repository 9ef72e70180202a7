import type { EntityManager } from '@mikro-orm/better-sqlite'
import type PgBoss from 'pg-boss'
import { Job } from './job.entity'
import type { JobMessage } from './job-protocol'
import { readyJobCondition } from './job-queue'
import { JobRunner, type JobRunnerOptions } from './job-runner'

/**
 * One pg-boss queue carries every kind, with the kind in the job's data: a node's worker threads
 * are one pool shared by all kinds, and priorities order work across kinds (what people upload
 * runs before the demo tables), which pg-boss orders only within a queue.
 */
export const JOB_QUEUE = 'stipple-jobs'

/** pg-boss's own tables live in a schema of their own beside Stipple's. */
export const JOB_QUEUE_SCHEMA = 'pgboss'

export interface PgBossRunnerOptions extends JobRunnerOptions {
  /** Runs after the first when the work fails or its node dies (pg-boss's retryLimit). */
  retryLimit?: number
  /** Seconds before the first retry; pg-boss doubles it (with jitter) for each one after. */
  retryDelaySeconds?: number
  /**
   * pg-boss's expiry of an active job. The heartbeat finds a dead node's job within seconds;
   * this is only the backstop (should a node die between its row and pg-boss's), so it is long
   * enough for the largest ingest.
   */
  expireInSeconds?: number
  /** How often pg-boss's upkeep (expiry, archiving) runs; any node may do it. */
  maintenanceIntervalSeconds?: number
}

/** What a pg-boss job carries: the job row's id is the work; the row holds its payload. */
interface QueuedWork {
  jobId: number
  kind: string
}

/** A job this node took from pg-boss: which pg-boss job, and which run of the row it is. */
interface Claim {
  bossId: string
  attempt: number
  retryCount: number
  retryLimit: number
}

/**
 * The job runner of the PostgreSQL profile: the same job rows, kinds, completions and worker
 * threads as JobRunner, with pg-boss carrying the work between any number of nodes.
 *
 * The `job` row stays the record the API and the client read (state, progress, message, error,
 * attempts) and decides; pg-boss is the transport. A queued row is sent to pg-boss by whichever
 * node sees it first after it committed (so a row that rolls back is never sent, and a node that
 * dies between commit and send loses nothing), once nothing it must follow is queued or running
 * on its subject. Its singleton key is the kind's dedupe key: newer work's send cancels the queued
 * pg-boss job of the work it superseded. Failures go back to pg-boss for a retry with back-off;
 * a node whose heartbeat stopped has its jobs failed over to pg-boss's retry the same way, so
 * another node runs them again, once.
 */
export class PgBossJobRunner extends JobRunner {
  private connecting: Promise<PgBoss> | null = null
  private boss: PgBoss | null = null
  private readonly claims = new Map<number, Claim>()

  constructor(private readonly q: PgBossRunnerOptions) {
    // pg-boss counts the runs (retryLimit); the base runner's own limit does not apply.
    super({ ...q, maxAttempts: Number.POSITIVE_INFINITY })
  }

  override async stop(): Promise<void> {
    await super.stop()
    // The jobs this node was running stay active in pg-boss with a still heartbeat: another
    // node takes them back (see reclaimAbandoned), as it would from a node that died.
    this.claims.clear()
    const connecting = this.connecting
    this.connecting = null
    this.boss = null
    const boss = await connecting?.catch(() => null)
    await boss?.stop({ graceful: false, close: true })
  }

  /** pg-boss, started (its schema made or brought up to date) on first use and after a failure. */
  private connection(): Promise<PgBoss> {
    if (!this.connecting) {
      const connecting = this.connect()
      this.connecting = connecting
      connecting.catch(() => {
        if (this.connecting === connecting) this.connecting = null
      })
    }
    return this.connecting
  }

  private async connect(): Promise<PgBoss> {
    // Loaded only on this profile: the embedded one never pays for it.
    const { default: PgBossClass } = await import('pg-boss')
    const boss = new PgBossClass({
      connectionString: String(this.o.orm.config.get('clientUrl')),
      schema: JOB_QUEUE_SCHEMA,
      application_name: 'stipple-jobs',
      max: 4,
      schedule: false,
      maintenanceIntervalSeconds: this.q.maintenanceIntervalSeconds ?? 60,
    })
    boss.on('error', (err) => this.o.logger.error({ err }, 'job queue error'))
    try {
      await boss.start()
      await boss.createQueue(JOB_QUEUE, { name: JOB_QUEUE, policy: 'short' })
    } catch (err) {
      await boss.stop({ graceful: false, close: true }).catch(() => undefined)
      throw err
    }
    this.boss = boss
    return boss
  }

  protected override async claimJobs(em: EntityManager): Promise<void> {
    const boss = await this.connection()
    if (this.stopped) return
    await this.reclaimAbandoned(em, boss)
    await this.dispatch(em, boss)
    if (this.freeThreads <= 0) return
    const fetched = await boss.fetch<QueuedWork>(JOB_QUEUE, {
      batchSize: this.freeThreads,
      includeMetadata: true,
    })
    for (const item of fetched) {
      const attempt = this.stopped ? null : await this.claimRow(em, item.data.jobId)
      if (attempt === null) {
        // Superseded, already recorded, or still alive on another node: this copy has no work.
        await boss.complete(JOB_QUEUE, item.id)
        continue
      }
      const job = await em.findOneOrFail(Job, { id: item.data.jobId })
      this.claims.set(job.id, {
        bossId: item.id,
        attempt,
        retryCount: item.retryCount,
        retryLimit: item.retryLimit,
      })
      this.launch(job)
    }
  }

  /**
   * Marks the row running for this node, if it is still to be done: queued, or running on a
   * node whose heartbeat stopped (pg-boss expired its job). Returns which run this is.
   */
  private async claimRow(em: EntityManager, jobId: number): Promise<number | null> {
    const now = new Date()
    const rows = await em.getConnection().execute<{ attempts: number }[]>(
      `update job set state = 'running', started_at = ?, heartbeat_at = ?, attempts = attempts + 1, message = null
        where id = ? and not cancel_requested
          and (state = 'queued' or (state = 'running' and (heartbeat_at is null or heartbeat_at < ?)))
        returning attempts`,
      [now, now, jobId, this.staleSince(now)],
      'all',
    )
    return rows[0]?.attempts ?? null
  }

  private staleSince(now: Date): Date {
    return new Date(now.getTime() - this.staleAfterMs)
  }

  /**
   * Sends every committed, queued row that waits for nothing and has no live pg-boss job. One
   * node at a time does it (a transaction-scoped advisory lock; a node that finds it taken
   * leaves this round to the holder), and its sends commit before the lock goes, so no other
   * node sends a row twice. A queued pg-boss job under the same singleton key belongs to work
   * this row superseded (only one row per kind and key is queued): it is cancelled first.
   */
  private async dispatch(em: EntityManager, boss: PgBoss): Promise<void> {
    await em.transactional(async (tem) => {
      const lock = await tem.execute<{ locked: boolean }>(
        `select pg_try_advisory_xact_lock(hashtext(?)) as locked`,
        [`${JOB_QUEUE}:dispatch`],
        'get',
      )
      if (!lock?.locked) return
      const ready = await tem.execute<
        { id: number; kind: string; dedupe_key: string; priority: number }[]
      >(
        `select j.id, j.kind, j.dedupe_key, j.priority from job j where ${readyJobCondition(tem)}
          and not exists (select 1 from ${JOB_QUEUE_SCHEMA}.job b where b.name = ?
            and b.state < 'completed' and b.data->>'jobId' = j.id::text)
          order by j.priority desc, j.id limit 100`,
        [JOB_QUEUE],
        'all',
      )
      for (const row of ready) await this.send(tem, boss, row)
    })
  }

  private async send(
    em: EntityManager,
    boss: PgBoss,
    row: { id: number; kind: string; dedupe_key: string; priority: number },
  ): Promise<void> {
    const singletonKey = `${row.kind}:${row.dedupe_key}`
    const superseded = await em.execute<{ id: string }[]>(
      `select id::text as id from ${JOB_QUEUE_SCHEMA}.job where name = ? and state = 'created' and singleton_key = ? and data->>'jobId' <> ?`,
      [JOB_QUEUE, singletonKey, String(row.id)],
      'all',
    )
    if (superseded.length)
      await boss.cancel(
        JOB_QUEUE,
        superseded.map((s) => s.id),
      )
    await boss.send(JOB_QUEUE, { jobId: row.id, kind: row.kind } satisfies QueuedWork, {
      singletonKey,
      priority: row.priority,
      retryLimit: this.q.retryLimit ?? 2,
      retryDelay: this.q.retryDelaySeconds ?? 5,
      retryBackoff: true,
      expireInSeconds: this.q.expireInSeconds ?? 4 * 3600,
    })
  }

  /**
   * Rows running on a node whose heartbeat stopped go back to the queue (one node wins each
   * row), and their pg-boss job is failed over to a retry, which any node may take; with its
   * retries spent, the job is recorded failed.
   */
  private async reclaimAbandoned(em: EntityManager, boss: PgBoss): Promise<void> {
    const reclaimed = await em.getConnection().execute<{ id: number; attempts: number }[]>(
      `update job set state = 'queued', message = 'interrupted; will run again'
          where state = 'running' and (heartbeat_at is null or heartbeat_at < ?)
          returning id, attempts`,
      [this.staleSince(new Date())],
      'all',
    )
    for (const row of reclaimed) {
      const active = await em
        .getConnection()
        .execute<{ id: string; retry_count: number; retry_limit: number }[]>(
          `select id::text as id, retry_count, retry_limit from ${JOB_QUEUE_SCHEMA}.job
            where name = ? and state = 'active' and data->>'jobId' = ?`,
          [JOB_QUEUE, String(row.id)],
          'all',
        )
      for (const job of active) {
        await boss.fail(JOB_QUEUE, job.id, { message: 'its node stopped' })
        if (job.retry_count >= job.retry_limit)
          await super.finish(row.id, {
            type: 'failed',
            error: `Interrupted ${row.attempts} times; given up.`,
          })
      }
    }
  }

  /** Hands the outcome to pg-boss too: done completes, a failure is retried while runs remain. */
  protected override async finish(
    id: number,
    outcome: Extract<JobMessage, { type: 'done' | 'failed' }>,
  ): Promise<void> {
    const claim = this.claims.get(id)
    this.claims.delete(id)
    const boss = this.boss
    if (!claim || !boss) return super.finish(id, outcome)
    try {
      const row = await this.o.orm.em.fork().findOne(Job, { id })
      if (row && (row.cancelRequested || row.state === 'cancelled')) {
        await super.finish(id, outcome)
        await boss.complete(JOB_QUEUE, claim.bossId)
        return
      }
      // Another node took the job back (this one's heartbeat had stopped): the outcome is theirs.
      if (!row || row.state !== 'running' || row.attempts !== claim.attempt) return
      if (outcome.type === 'failed' && claim.retryCount < claim.retryLimit) {
        await this.o.orm.em
          .fork()
          .nativeUpdate(
            Job,
            { id, state: 'running', attempts: claim.attempt },
            { state: 'queued', message: `Run ${claim.attempt} failed; it will be tried again.` },
          )
        await boss.fail(JOB_QUEUE, claim.bossId, { message: outcome.error })
        return
      }
      await super.finish(id, outcome)
      if (outcome.type === 'done') await boss.complete(JOB_QUEUE, claim.bossId)
      else await boss.fail(JOB_QUEUE, claim.bossId, { message: outcome.error })
    } catch (err) {
      // The row keeps its state; the heartbeat or pg-boss's expiry brings the job back.
      this.o.logger.error({ err, job: id }, 'handing a job outcome to the queue failed')
    }
  }

  /** A superseded job this node stopped: its pg-boss job is done with. */
  protected override async released(id: number): Promise<void> {
    const claim = this.claims.get(id)
    this.claims.delete(id)
    if (claim) await this.boss?.complete(JOB_QUEUE, claim.bossId)
  }
}
