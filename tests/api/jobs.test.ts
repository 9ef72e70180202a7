import { mkdtempSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { openDatabase, type Orm } from '@server/db'
import { Job } from '@server/jobs/job.entity'
import { z } from 'zod'
import { defineJobKind } from '@server/jobs/job-kind'
import { recordingJob } from '@server/jobs/job-context'
import { claimNextJob, enqueue, hasClaimableJobs } from '@server/jobs/job-queue'
import { queueProbeJob } from '@server/jobs/queue-probe.job'
import { JobRunner } from '@server/jobs/job-runner'
import { createLogger } from '@server/logger'

let orm: Orm
const outcomes: string[] = []
beforeAll(async () => {
  orm = await openDatabase(':memory:')
})
afterAll(() => orm.close())

function runner() {
  return new JobRunner({
    orm,
    logger: createLogger('silent'),
    dataDir: mkdtempSync(join(tmpdir(), 'stipple-jobs-')),
    workers: 2,
    pollMs: 50,
    heartbeatMs: 100,
    completions: {
      'queue-probe': {
        done: async (_em, job, result) =>
          void outcomes.push(`done ${job.id} ${JSON.stringify(result)}`),
        failed: async (_em, job, error) => void outcomes.push(`failed ${job.id} ${error}`),
      },
    },
  })
}

async function until(check: () => Promise<boolean>, ms = 15_000) {
  const end = Date.now() + ms
  while (!(await check())) {
    if (Date.now() > end) throw new Error('timed out')
    await new Promise((r) => setTimeout(r, 50))
  }
}

const jobState = async (id: number) => (await orm.em.fork().findOneOrFail(Job, { id })).state

describe('the job queue', () => {
  it('runs a job in a worker thread, recording progress and the outcome', async () => {
    const em = orm.em.fork()
    const job = await enqueue(em, queueProbeJob, { ms: 600, n: 1 })
    await em.flush()
    const r = runner()
    r.start()
    const seen = new Set<number>()
    await until(async () => {
      const row = await orm.em.fork().findOneOrFail(Job, { id: job.id })
      if (row.state === 'running') seen.add(row.progress)
      return row.state === 'done'
    })
    await r.stop()
    expect([...seen].some((p) => p > 0 && p < 1)).toBe(true)
    expect(outcomes).toContain(`done ${job.id} {"echoed":{"subjectId":0,"ms":600,"n":1}}`)
  })

  it('records a failure in words', async () => {
    const em = orm.em.fork()
    const job = await enqueue(em, queueProbeJob, { fail: 'the table has no x column' })
    await em.flush()
    const r = runner()
    r.start()
    await until(async () => (await jobState(job.id)) === 'failed')
    await r.stop()
    expect((await orm.em.fork().findOneOrFail(Job, { id: job.id })).error).toBe(
      'the table has no x column',
    )
  })

  it('takes up a job whose process died (stale heartbeat) and completes it', async () => {
    const em = orm.em.fork()
    const job = await enqueue(em, queueProbeJob, { ms: 100 })
    await em.flush()
    // What a killed process leaves behind: the job marked running, its heartbeat long gone.
    await em.nativeUpdate(
      Job,
      { id: job.id },
      { state: 'running', attempts: 1, heartbeatAt: new Date(Date.now() - 60_000) },
    )
    const r = runner()
    r.start()
    await until(async () => (await jobState(job.id)) === 'done')
    await r.stop()
    expect((await orm.em.fork().findOneOrFail(Job, { id: job.id })).attempts).toBe(2)
  })

  it('a stopped runner leaves its job to be resumed by the next one', async () => {
    const em = orm.em.fork()
    const job = await enqueue(em, queueProbeJob, { ms: 3000 })
    await em.flush()
    const first = runner()
    first.start()
    await until(async () => (await jobState(job.id)) === 'running')
    await first.stop()
    expect(await jobState(job.id)).toBe('running')
    const second = runner()
    second.start()
    await until(async () => (await jobState(job.id)) === 'done', 20_000)
    await second.stop()
  })

  it('an idle poll sees nothing to claim; a queued or stale job is seen', async () => {
    const em = orm.em.fork()
    await em.nativeDelete(Job, {})
    expect(await hasClaimableJobs(em, 1000)).toBe(false)
    const job = await enqueue(em, queueProbeJob, {})
    await em.flush()
    expect(await hasClaimableJobs(em, 1000)).toBe(true)
    await em.nativeUpdate(Job, { id: job.id }, { state: 'running', heartbeatAt: new Date() })
    expect(await hasClaimableJobs(em, 1000)).toBe(false)
    await em.nativeUpdate(Job, { id: job.id }, { heartbeatAt: new Date(Date.now() - 5000) })
    expect(await hasClaimableJobs(em, 1000)).toBe(true)
    await em.nativeDelete(Job, { id: job.id })
  })

  it('fails an unknown kind of job', async () => {
    const em = orm.em.fork()
    const job = em.create(Job, {
      kind: 'no-such-work',
      payload: {},
      subjectType: 'dataset',
      subjectId: 0,
      dedupeKey: 'none',
    })
    await em.flush()
    const r = runner()
    r.start()
    await until(async () => (await jobState(job.id)) === 'failed')
    await r.stop()
    expect((await orm.em.fork().findOneOrFail(Job, { id: job.id })).error).toMatch(/No job of kind/)
  })

  it('waits for the kinds it must follow on the same subject, and only those', async () => {
    const em = orm.em.fork()
    await em.nativeDelete(Job, {})
    const followsProbe = defineJobKind({
      name: 'follows-probe',
      payload: z.object({ subjectId: z.int() }),
      subject: (p) => ({ type: 'dataset', id: p.subjectId }),
      after: ['queue-probe'],
    })
    const later = await enqueue(em, followsProbe, { subjectId: 7 })
    const first = await enqueue(em, queueProbeJob, { subjectId: 7 })
    const elsewhere = await enqueue(em, queueProbeJob, { subjectId: 8 })
    await em.flush()
    // The follower is older, but its subject still has probe work queued.
    expect(await claimNextJob(em)).toBe(first.id)
    expect(await claimNextJob(em)).toBe(elsewhere.id)
    expect(await claimNextJob(em)).toBeNull()
    await em.nativeUpdate(Job, { id: first.id }, { state: 'done' })
    expect(await claimNextJob(em)).toBe(later.id)
  })

  it('newer work of the same key replaces queued work and stops running work', async () => {
    const em = orm.em.fork()
    await em.nativeDelete(Job, {})
    const running = await enqueue(em, queueProbeJob, { ms: 4000, key: 'table-7' })
    await em.flush()
    const r = runner()
    r.start()
    await until(async () => (await jobState(running.id)) === 'running')
    const queued = await enqueue(em, queueProbeJob, { ms: 4000, key: 'other' })
    const replaced = await enqueue(em, queueProbeJob, { ms: 100, key: 'table-7', n: 1 })
    const latest = await enqueue(em, queueProbeJob, { ms: 100, key: 'table-7', n: 2 })
    await em.flush()
    await until(async () => (await jobState(latest.id)) === 'done')
    await r.stop()
    expect(await jobState(running.id)).toBe('cancelled')
    expect(await jobState(replaced.id)).toBe('cancelled')
    expect(await jobState(queued.id)).not.toBe('cancelled')
    expect(outcomes.some((o) => o.startsWith(`done ${running.id} `))).toBe(false)
  })

  it('runs higher priority first, and work queued while recording a job takes its priority', async () => {
    const em = orm.em.fork()
    await em.nativeDelete(Job, {})
    const background = await enqueue(em, queueProbeJob, { subjectId: 1 }, { priority: -10 })
    const upload = await enqueue(em, queueProbeJob, { subjectId: 2 })
    expect(await claimNextJob(em)).toBe(upload.id)
    expect(await claimNextJob(em)).toBe(background.id)
    const followUp = await recordingJob.run({ priority: -10 }, () =>
      enqueue(em, queueProbeJob, { subjectId: 1 }),
    )
    expect(followUp.priority).toBe(-10)
  })
})
