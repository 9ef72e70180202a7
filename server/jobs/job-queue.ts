import type { EntityManager } from '@mikro-orm/better-sqlite'
import { Job, type IJob } from './job.entity'

export interface EnqueueOptions {
  kind: string
  payload: Record<string, unknown>
  fileId?: number | null
}

/** Adds a job to the unit of work; it is queued when the caller's transaction commits. */
export function enqueueJob(em: EntityManager, options: EnqueueOptions): IJob {
  return em.create(Job, {
    kind: options.kind,
    payload: options.payload,
    file: options.fileId ?? null,
  })
}

/**
 * Takes the oldest queued job in one statement, so two processes never take the same one.
 * Returns its id, or null when the queue is empty.
 */
export async function claimNextJob(em: EntityManager, now = new Date()): Promise<number | null> {
  const rows = await em
    .getConnection()
    .execute<{ id: number }[]>(
      "update `job` set `state` = 'running', `started_at` = ?, `heartbeat_at` = ?, `attempts` = `attempts` + 1 where `id` = (select `id` from `job` where `state` = 'queued' order by `id` limit 1) returning `id`",
      [now.getTime(), now.getTime()],
      'all',
    )
  return rows[0]?.id ?? null
}

/**
 * Whether a poll has anything to do: a queued job, or a running one whose heartbeat is older than
 * `staleAfterMs`. A read only, so an idle poll never takes SQLite's write lock (nor waits for a
 * commit's fsync on the request thread).
 */
export async function hasClaimableJobs(
  em: EntityManager,
  staleAfterMs: number,
  now = new Date(),
): Promise<boolean> {
  const row = await em
    .getConnection()
    .execute<{ found?: number }>(
      "select 1 as `found` from `job` where `state` = 'queued' or (`state` = 'running' and (`heartbeat_at` is null or `heartbeat_at` < ?)) limit 1",
      [now.getTime() - staleAfterMs],
      'get',
    )
  return row?.found === 1
}

/** Jobs whose process stopped beating (killed, crashed) go back to the queue. */
export async function requeueAbandonedJobs(
  em: EntityManager,
  staleAfterMs: number,
  now = new Date(),
): Promise<number> {
  return em.nativeUpdate(
    Job,
    {
      state: 'running',
      $or: [
        { heartbeatAt: null },
        { heartbeatAt: { $lt: new Date(now.getTime() - staleAfterMs) } },
      ],
    },
    { state: 'queued', message: 'interrupted; will run again' },
  )
}
