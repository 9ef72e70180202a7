import type { Worker } from 'node:worker_threads'
import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { Orm } from '../db'
import type { Logger } from '../logger'
import { startThread } from '../threads'
import { Job, type IJob } from './job.entity'
import type { JobMessage } from './job-protocol'
import { recordingJob } from './job-context'
import { claimNextJob, hasClaimableJobs, requeueAbandonedJobs } from './job-queue'
import type { BackgroundJobs } from './background-jobs'
import type { StorageConfig } from '../storage/storage-config'

/** What the main thread does with a job's outcome (database updates), per kind. */
export interface JobCompletion {
  done(em: EntityManager, job: IJob, result: unknown): Promise<void>
  failed?(em: EntityManager, job: IJob, error: string): Promise<void>
}

export interface JobRunnerOptions {
  orm: Orm
  logger: Logger
  /** The data directory; worker threads resolve storage keys under it. */
  dataDir: string
  /** Where the record of bytes is (the data directory, or a bucket it mirrors). */
  storage?: StorageConfig
  workers: number
  completions: Record<string, JobCompletion>
  pollMs?: number
  heartbeatMs?: number
  /** A job interrupted this many times is given up (it probably kills its process). */
  maxAttempts?: number
  /** Kinds whose thread is ended after the job, giving its memory back (JobKind.freshThread). */
  freshThreadKinds?: ReadonlySet<string>
}

const WORKER_URL = new URL('./worker.ts', import.meta.url)

/**
 * Runs queued jobs in worker threads, a few at a time, off the request thread. Progress and
 * outcomes are written to the job rows, so the client can watch and a restart can resume.
 */
export class JobRunner implements BackgroundJobs {
  protected readonly running = new Map<number, Worker>()
  /** The kind each running job has, for what happens to its thread afterwards. */
  private readonly kinds = new Map<number, string>()
  private idle: Worker[] = []
  private timer: NodeJS.Timeout | null = null
  private ticking = false
  protected stopped = false

  constructor(protected readonly o: JobRunnerOptions) {}

  start(): void {
    this.stopped = false
    const every = this.o.pollMs ?? 500
    this.timer = setInterval(() => void this.tick(), every)
    this.timer.unref()
    void this.tick()
  }

  /** Looks for work now (after an enqueue) instead of at the next poll. */
  notify(): void {
    void this.tick()
  }

  async stop(): Promise<void> {
    this.stopped = true
    if (this.timer) clearInterval(this.timer)
    // Interrupted jobs stay 'running' with an old heartbeat and are picked up again after a restart.
    const workers = new Set([...this.running.values(), ...this.idle])
    this.running.clear()
    this.idle = []
    await Promise.all([...workers].map((w) => w.terminate()))
  }

  get busy(): number {
    return this.running.size
  }

  /** Worker threads alive now, busy or idle. */
  get threads(): number {
    return this.running.size + this.idle.length
  }

  private async tick(): Promise<void> {
    if (this.ticking || this.stopped) return
    this.ticking = true
    try {
      const em = this.o.orm.em.fork()
      if (this.running.size) {
        await em.nativeUpdate(
          Job,
          { id: { $in: [...this.running.keys()] } },
          { heartbeatAt: new Date() },
        )
        await this.stopCancelled(em)
      }
      await this.claimJobs(em)
    } catch (err) {
      this.o.logger.error({ err }, 'job runner tick failed')
    } finally {
      this.ticking = false
    }
  }

  /** How long a running job's heartbeat may stay still before its process counts as dead. */
  protected get staleAfterMs(): number {
    return (this.o.heartbeatMs ?? 2000) * 5
  }

  protected get freeThreads(): number {
    return this.stopped ? 0 : this.o.workers - this.running.size
  }

  /**
   * Takes ready jobs from the job table while threads are free, first returning those whose
   * process stopped beating to the queue.
   */
  protected async claimJobs(em: EntityManager): Promise<void> {
    if (this.freeThreads <= 0 || !(await hasClaimableJobs(em, this.staleAfterMs))) return
    await requeueAbandonedJobs(em, this.staleAfterMs)
    while (this.freeThreads > 0) {
      const id = await claimNextJob(em)
      if (id === null) break
      const job = await em.findOneOrFail(Job, { id })
      this.launch(job)
    }
  }

  /** A job left this runner cancelled (newer work replaced it); nothing more to do here. */
  protected async released(_id: number): Promise<void> {}

  /**
   * Running jobs that newer work replaced: their thread is ended (the only sure way to stop
   * synchronous work) and the job recorded as cancelled; a fresh thread takes the next job.
   */
  private async stopCancelled(em: EntityManager): Promise<void> {
    const cancelled = await em.find(
      Job,
      { id: { $in: [...this.running.keys()] }, cancelRequested: true },
      { fields: ['id'] },
    )
    for (const { id } of cancelled) {
      const worker = this.running.get(id)
      this.running.delete(id)
      if (worker) void worker.terminate()
      await em.nativeUpdate(
        Job,
        { id },
        { state: 'cancelled', message: 'replaced by newer work', finishedAt: new Date() },
      )
      await this.released(id)
    }
  }

  /** An idle worker thread, or a new one (they load the job modules once, then stay). */
  private worker(): Worker {
    const idle = this.idle.pop()
    if (idle) return idle
    const worker = startThread(WORKER_URL, {
      workerData: {
        role: 'job-worker',
        dataDir: this.o.dataDir,
        storage: this.o.storage ?? { kind: 'local' },
      },
    })
    worker.on('message', (m: JobMessage & { id?: number }) => {
      if (m.id === undefined) return
      if (m.type === 'progress') {
        void this.o.orm.em
          .fork()
          .nativeUpdate(
            Job,
            { id: m.id },
            { progress: m.fraction, message: m.message ?? null, heartbeatAt: new Date() },
          )
        return
      }
      this.running.delete(m.id)
      const kind = this.kinds.get(m.id)
      this.kinds.delete(m.id)
      if (kind && this.o.freshThreadKinds?.has(kind)) void worker.terminate()
      else if (!this.stopped) this.idle.push(worker)
      void this.finish(m.id, m).then(() => this.notify())
    })
    worker.on('error', (err) => this.lost(worker, err.message))
    worker.on('exit', (code) =>
      this.lost(worker, `The worker stopped unexpectedly (exit code ${code}).`),
    )
    return worker
  }

  /** A worker died: its job (if any) fails with the reason, and the worker is not reused. */
  private lost(worker: Worker, reason: string) {
    this.idle = this.idle.filter((w) => w !== worker)
    for (const [id, w] of this.running) {
      if (w !== worker) continue
      this.running.delete(id)
      if (!this.stopped) void this.finish(id, { type: 'failed', error: reason })
    }
  }

  protected launch(job: IJob): void {
    if (job.attempts > (this.o.maxAttempts ?? 3)) {
      void this.finish(job.id, {
        type: 'failed',
        error: `Interrupted ${job.attempts - 1} times; given up.`,
      })
      return
    }
    const worker = this.worker()
    this.running.set(job.id, worker)
    this.kinds.set(job.id, job.kind)
    worker.postMessage({ id: job.id, kind: job.kind, payload: job.payload })
  }

  /** Records a job's outcome in its row (and what its kind does with it). */
  protected async finish(
    id: number,
    outcome: Extract<JobMessage, { type: 'done' | 'failed' }>,
  ): Promise<void> {
    const em = this.o.orm.em.fork()
    try {
      await em.transactional(async (tem) => {
        const job = await tem.findOneOrFail(Job, { id })
        // Newer work replaced it while it ran: its result is stale and is not recorded.
        if (job.cancelRequested || job.state === 'cancelled') {
          Object.assign(job, { state: 'cancelled', finishedAt: job.finishedAt ?? new Date() })
          return
        }
        const completion = this.o.completions[job.kind]
        if (outcome.type === 'done') {
          await recordingJob.run({ priority: job.priority }, () =>
            completion?.done(tem, job, outcome.result),
          )
          Object.assign(job, { state: 'done', progress: 1, message: null, finishedAt: new Date() })
        } else {
          await completion?.failed?.(tem, job, outcome.error)
          Object.assign(job, { state: 'failed', error: outcome.error, finishedAt: new Date() })
        }
      })
    } catch (err) {
      this.o.logger.error({ err, job: id }, 'recording a job outcome failed')
      await em.nativeUpdate(
        Job,
        { id },
        {
          state: 'failed',
          error: `Could not record the outcome: ${err instanceof Error ? err.message : String(err)}`,
          finishedAt: new Date(),
        },
      )
    }
  }
}
