import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { z } from 'zod'
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
 * The oldest queued job that waits for nothing: no queued or running job of a kind it must follow
 * on the same subject.
 */
const NEXT_READY_JOB = `select j.id from job j where j.state = 'queued' and not exists (
  select 1 from job w where w.subject_type = j.subject_type and w.subject_id = j.subject_id
    and w.state in ('queued', 'running') and w.id <> j.id
    and instr(j.after_kinds, ',' || w.kind || ',') > 0
) order by j.priority desc, j.id limit 1`

/**
 * Takes the oldest queued job in one statement, so two processes never take the same one.
 * Returns its id, or null when the queue is empty.
 */
export async function claimNextJob(em: EntityManager, now = new Date()): Promise<number | null> {
  const rows = await em
    .getConnection()
    .execute<{ id: number }[]>(
      `update \`job\` set \`state\` = 'running', \`started_at\` = ?, \`heartbeat_at\` = ?, \`attempts\` = \`attempts\` + 1 where \`id\` = (${NEXT_READY_JOB}) returning \`id\``,
      [now.getTime(), now.getTime()],
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
      `select 1 as found where exists (${NEXT_READY_JOB}) or exists (select 1 from job where state = 'running' and (heartbeat_at is null or heartbeat_at < ?))`,
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
