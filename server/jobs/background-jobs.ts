import { databaseDriver } from '../db'
import { JobRunner } from './job-runner'
import { PgBossJobRunner, type PgBossRunnerOptions } from './pg-boss-queue'

/** What the server and the cluster primary need of whichever runner takes the jobs. */
export interface BackgroundJobs {
  start(): void
  /** Looks for work now (after an enqueue) instead of at the next poll. */
  notify(): void
  stop(): Promise<void>
  /** Jobs this process runs now. */
  readonly busy: number
  /** Worker threads alive now, busy or idle. */
  readonly threads: number
}

/**
 * The job runner for the open database, chosen by configuration alone: on SQLite the
 * in-process runner claims rows of the job table; on PostgreSQL pg-boss carries the same jobs
 * between any number of nodes.
 */
export function createJobRunner(options: PgBossRunnerOptions): JobRunner {
  return databaseDriver(options.orm) === 'postgresql'
    ? new PgBossJobRunner(options)
    : new JobRunner(options)
}
