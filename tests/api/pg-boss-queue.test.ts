/**
 * The job queue of the PostgreSQL profile: pg-boss carries the job rows between nodes. Always
 * on PostgreSQL (a throwaway server from tests/fixtures/postgres.ts), whatever the test profile.
 */
import { mkdtempSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest'
import type { z } from 'zod'
import { openDatabase, type Orm } from '@server/db'
import { Job } from '@server/jobs/job.entity'
import { enqueue } from '@server/jobs/job-queue'
import type { JobRunner } from '@server/jobs/job-runner'
import { PgBossJobRunner } from '@server/jobs/pg-boss-queue'
import { queueProbeJob } from '@server/jobs/queue-probe.job'
import { createLogger } from '@server/logger'
import { ingestTableJob } from '@server/modules/files/file-job-kinds'
import { computeQualityJob } from '@server/modules/quality/quality-job-kind'
import { buildSharedDraft } from '../fixtures/builders'
import { settledFile, startJobRunner } from '../fixtures/job-runner'
import { listen } from '../fixtures/live-server'
import { jobRow, queueStates } from '../fixtures/pg-boss-jobs'
import { startPostgres, type PostgresServer } from '../fixtures/postgres'
import { createTestApp, type TestApp } from '../fixtures/test-app'
import { tusUpload } from '../fixtures/tus-upload'

let postgres: PostgresServer
beforeAll(async () => {
  postgres = await startPostgres()
}, 60_000)
afterAll(() => postgres.stop())

async function until(check: () => Promise<boolean>, ms = 30_000) {
  const end = Date.now() + ms
  while (!(await check())) {
    if (Date.now() > end) throw new Error('timed out')
    await new Promise((r) => setTimeout(r, 25))
  }
}

describe('a real kind on the PostgreSQL profile', () => {
  let t: TestApp
  let live: Awaited<ReturnType<typeof listen>>
  let runner: JobRunner
  let token: string
  let accession: string

  beforeAll(async () => {
    t = await createTestApp({}, { database: 'postgresql' })
    live = await listen(t.app)
    runner = startJobRunner(t)
    const { dataset, tokens } = await buildSharedDraft(t.em(), {})
    token = tokens.member!
    accession = dataset.accession
  }, 60_000)
  afterAll(async () => {
    await runner?.stop()
    await live?.close()
    await t?.close()
  })

  it('ingests an uploaded table through pg-boss: the file becomes ready, each job done once', async () => {
    expect(runner).toBeInstanceOf(PgBossJobRunner)
    const upload = await tusUpload(
      `${live.url}/api/uploads`,
      token,
      Buffer.from('frame,x [nm],y [nm],photons\n1,100.5,200.25,1500\n2,110,210,1400\n'),
      { dataset: accession, filename: 'small.csv' },
    )
    const fileId = Number(upload.fileId)
    expect((await settledFile(t, fileId)).status).toBe('ready')
    const jobs = await t.em().find(Job, { file: fileId }, { orderBy: { id: 'asc' } })
    expect(jobs.map((j) => j.kind)).toEqual(['inspect-table', 'ingest-table', 'compute-quality'])
    await until(async () => (await jobRow(t.orm, jobs[2]!.id)).state === 'done')
    for (const job of jobs) {
      expect(await jobRow(t.orm, job.id)).toMatchObject({ state: 'done', attempts: 1 })
      // Our row turns done inside the handler; pg-boss completes its own job once the handler has
      // returned, a moment later (a full run here once read 'active' in between).
      await expect
        .poll(() => queueStates(t.orm, job.id), { timeout: 10_000 })
        .toEqual(['completed'])
    }
  }, 60_000)

  it('sends a quality report only once the ingest it must follow has finished', async () => {
    const em = t.em()
    const ingested = await em.findOneOrFail(Job, { kind: 'ingest-table', state: 'done' })
    const fileId = ingested.file!
    const ingest = await em.transactional(async (tem) => {
      const queued = await enqueue(tem, ingestTableJob, ingested.payload as never)
      await enqueue(tem, computeQualityJob, { fileId, inputs: {} })
      return queued
    })
    runner.notify()
    /** Quality reports queued since (the ingest's completion queues one more, replacing ours). */
    const reports = () =>
      t
        .em()
        .find(
          Job,
          { file: fileId, kind: 'compute-quality', id: { $gt: ingest.id } },
          { orderBy: { id: 'asc' } },
        )
    let sentEarly = false
    await until(async () => {
      const ingestRow = await jobRow(t.orm, ingest.id)
      if (ingestRow.state !== 'done')
        for (const report of await reports())
          if ((await queueStates(t.orm, report.id)).length)
            // Sent while the ingest still runs? Asked again: it may have finished in between and
            // queued (and sent) the report that follows it, which is no early send.
            if ((await jobRow(t.orm, ingest.id)).state !== 'done') sentEarly = true
      return ingestRow.state === 'done' && (await reports()).at(-1)?.state === 'done'
    }, 80_000)
    expect(sentEarly).toBe(false)
    const finished = (await jobRow(t.orm, ingest.id)).finishedAt!.getTime()
    const ran = (await reports()).filter((r) => r.startedAt)
    expect(ran.length).toBeGreaterThan(0)
    for (const report of ran) expect(report.startedAt!.getTime()).toBeGreaterThanOrEqual(finished)
  }, 90_000)
})

describe('queue behaviour with probe jobs, one database, one or two nodes', () => {
  let orm: Orm
  /** What each node's completions saw: `node done|failed jobId`. */
  const outcomes: string[] = []
  const runners: PgBossJobRunner[] = []

  beforeAll(async () => {
    orm = await openDatabase({ driver: 'postgresql', url: await postgres.createDatabase() })
  })
  // Each test starts its own nodes; none outlives it.
  afterEach(async () => {
    await Promise.all(runners.splice(0).map((r) => r.stop()))
  })
  afterAll(() => orm?.close())

  /** A node: its own runner (threads, pg-boss connection) on the shared database. */
  function node(name: string, workers = 1): PgBossJobRunner {
    const runner = new PgBossJobRunner({
      orm,
      logger: createLogger('silent'),
      dataDir: mkdtempSync(join(tmpdir(), 'stipple-pgboss-')),
      workers,
      pollMs: 50,
      heartbeatMs: 300,
      retryLimit: 1,
      retryDelaySeconds: 1,
      completions: {
        'queue-probe': {
          done: async (_em, job) => void outcomes.push(`${name} done ${job.id}`),
          failed: async (_em, job) => void outcomes.push(`${name} failed ${job.id}`),
        },
      },
    })
    runners.push(runner)
    runner.start()
    return runner
  }

  const probe = (input: z.input<typeof queueProbeJob.payload>) =>
    enqueue(orm.em.fork(), queueProbeJob, input)
  const outcomesOf = (id: number) => outcomes.filter((o) => o.endsWith(` ${id}`))

  it('retries a failing job with back-off, then records it failed once', async () => {
    const a = node('A')
    const job = await probe({ fail: 'the table has no x column' })
    a.notify()
    let retryWaited = false
    await until(async () => {
      const row = await jobRow(orm, job.id)
      if (row.state === 'queued' && row.attempts === 1) retryWaited = true
      return row.state === 'failed'
    })
    await a.stop()
    expect(retryWaited).toBe(true)
    expect(await jobRow(orm, job.id)).toMatchObject({
      state: 'failed',
      attempts: 2,
      error: 'the table has no x column',
    })
    expect(outcomesOf(job.id)).toEqual([`A failed ${job.id}`])
    expect(await queueStates(orm, job.id)).toEqual(['failed'])
  }, 60_000)

  it('newer work of the same key replaces queued work (its pg-boss job too) and stops running work', async () => {
    const a = node('A')
    const blocker = await probe({ ms: 2500, key: 'blocker' })
    await until(async () => (await jobRow(orm, blocker.id)).state === 'running')
    // The only thread is busy: this one is sent to pg-boss and waits there.
    const replaced = await probe({ ms: 100, key: 'table-7', n: 1 })
    a.notify()
    await until(async () => (await queueStates(orm, replaced.id)).includes('created'))
    const latest = await probe({ ms: 100, key: 'table-7', n: 2 })
    // Newer work on the blocker's key while it runs: the running one is stopped.
    const blockerAgain = await probe({ ms: 100, key: 'blocker', n: 3 })
    a.notify()
    await until(async () => (await jobRow(orm, latest.id)).state === 'done')
    await until(async () => (await jobRow(orm, blockerAgain.id)).state === 'done')
    await a.stop()
    expect((await jobRow(orm, replaced.id)).state).toBe('cancelled')
    expect((await jobRow(orm, blocker.id)).state).toBe('cancelled')
    expect(await queueStates(orm, replaced.id)).toEqual(['cancelled'])
    expect(outcomesOf(replaced.id)).toEqual([])
    expect(outcomesOf(blocker.id)).toEqual([])
    expect(outcomesOf(latest.id)).toEqual([`A done ${latest.id}`])
  }, 60_000)

  it('a job queued through node A runs on node B once A has stopped', async () => {
    const a = node('A')
    const blocker = await probe({ ms: 1500 })
    await until(async () => (await jobRow(orm, blocker.id)).state === 'running')
    const job = await probe({ ms: 100 })
    a.notify()
    await until(async () => (await queueStates(orm, job.id)).includes('created'))
    await a.stop()
    node('B')
    await until(async () => (await jobRow(orm, job.id)).state === 'done')
    await until(async () => (await jobRow(orm, blocker.id)).state === 'done')
    expect(outcomesOf(job.id)).toEqual([`B done ${job.id}`])
    // The blocker was cut off on A: B took it up again, and it ran to the end once.
    expect(outcomesOf(blocker.id)).toEqual([`B done ${blocker.id}`])
    expect((await jobRow(orm, blocker.id)).attempts).toBe(2)
  }, 60_000)

  it('a node stopped dead mid-job: the other node runs the job again, once', async () => {
    const a = node('A')
    const b = node('B')
    const job = await probe({ ms: 2000 })
    a.notify()
    await until(async () => a.busy + b.busy === 1)
    // Whichever node took it is cut off (threads terminated, no hand-over), as a killed one is.
    const [taker, other] = a.busy ? [a, 'B'] : [b, 'A']
    await taker.stop()
    await until(async () => (await jobRow(orm, job.id)).state === 'done')
    // A while longer: nothing runs it a third time.
    await new Promise((r) => setTimeout(r, 2000))
    expect(outcomesOf(job.id)).toEqual([`${other} done ${job.id}`])
    expect(await jobRow(orm, job.id)).toMatchObject({ state: 'done', attempts: 2 })
    expect(await queueStates(orm, job.id)).toEqual(['completed'])
  }, 60_000)
})
