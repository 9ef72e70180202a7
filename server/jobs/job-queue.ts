import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { z } from 'zod'
import { databaseDriver } from '../db'
import { dedupeKeyOf, type JobKind } from './job-kind'
import { recordingJob } from './job-context'
import { Job, type IJob } from './job.entity'

/**
 * Queues work of a kind: the payload is checked against the kind's schema, and earlier work of the
 * same kind and key is superseded (a queued one is cancelled, a running one asked to stop). The job
 * is written through the caller's EntityManager and runs once the caller's transaction commits.
 */
export async function enqueue<S extends z.ZodType>(
  em: EntityManager,
  kind: JobKind<S>,
  input: z.input<S>,
  options: { priority?: number } = {},
): Promise<IJob> {
  const payload = kind.payload.parse(input) as z.output<S> & Record<string, unknown>
  const subject = kind.subject(payload)
  const dedupeKey = dedupeKeyOf(kind, payload)
  const superseded = { kind: kind.name, dedupeKey }
  await em.nativeUpdate(
    Job,
    { ...superseded, state: 'queued' },
    { state: 'cancelled', message: 'replaced by newer work', finishedAt: new Date() },
  )
  await em.nativeUpdate(Job, { ...superseded, state: 'running' }, { cancelRequested: true })
  const job = em.create(Job, {
    kind: kind.name,
    payload,
    subjectType: subject.type,
    subjectId: subject.id,
    dedupeKey,
    afterKinds: kind.after?.length ? `,${kind.after.join(',')},` : '',
    priority: options.priority ?? recordingJob.getStore()?.priority ?? 0,
    file: subject.type === 'file' ? subject.id : null,
  })
  // Written now (inside the caller's transaction, if any), so that work queued next in the same
  // unit of work sees this job when it supersedes.
  await em.flush()
  return job
}

/**
 * A queued job that waits for nothing: no queued or running job of a kind it must follow on the
 * same subject. `j` is the queued job; each database finds a kind in the `,kind,` list its way.
 */
export function readyJobCondition(em: EntityManager): string {
  const listed =
    databaseDriver(em) === 'postgresql'
      ? `strpos(j.after_kinds, ',' || w.kind || ',') > 0`
      : `instr(j.after_kinds, ',' || w.kind || ',') > 0`
  return `j.state = 'queued' and not exists (
  select 1 from job w where w.subject_type = j.subject_type and w.subject_id = j.subject_id
    and w.state in ('queued', 'running') and w.id <> j.id and ${listed}
)`
}

/** The oldest queued job that waits for nothing (see readyJobCondition). */
const nextReadyJob = (em: EntityManager) =>
  `select j.id from job j where ${readyJobCondition(em)} order by j.priority desc, j.id limit 1`

/**
 * A time as raw SQL compares it with a datetime column: MikroORM stores SQLite's as epoch
 * milliseconds, PostgreSQL's as timestamptz (bound as a Date).
 */
const sqlTime = (em: EntityManager, time: Date): number | Date =>
  databaseDriver(em) === 'postgresql' ? time : time.getTime()

/**
 * Takes the oldest queued job in one statement, so two processes never take the same one.
 * Returns its id, or null when the queue is empty.
 */
export async function claimNextJob(em: EntityManager, now = new Date()): Promise<number | null> {
  const rows = await em
    .getConnection()
    .execute<{ id: number }[]>(
      `update "job" set "state" = 'running', "started_at" = ?, "heartbeat_at" = ?, "attempts" = "attempts" + 1 where "id" = (${nextReadyJob(em)}) returning "id"`,
      [sqlTime(em, now), sqlTime(em, now)],
      'all',
    )
  return rows[0]?.id ?? null
}

/**
 * Whether a poll has anything to do: a queued job ready to start, or a running one whose heartbeat is older than
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
      `select 1 as found where exists (${nextReadyJob(em)}) or exists (select 1 from job where state = 'running' and (heartbeat_at is null or heartbeat_at < ?))`,
      [sqlTime(em, new Date(now.getTime() - staleAfterMs))],
      'get',
    )
  return Number(row?.found) === 1
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
