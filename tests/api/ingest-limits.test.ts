/**
 * What one localization table may cost: a decompression bomb, a table with too many rows, or one
 * whose converted store would not fit the project's quota stops with a clear rejection; derived
 * bytes count against the quota; an ingest's thread (and its memory) ends with it.
 */
import { gzipSync } from 'node:zlib'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { JobRunner } from '@server/jobs/job-runner'
import { Job } from '@server/jobs/job.entity'
import type { IDatasetFile } from '@server/modules/files/dataset-file.entity'
import type { IUser } from '@server/modules/users/user.entity'
import { buildDataset, buildMember, buildProject, tokenFor } from '../fixtures/builders'
import { startJobRunner, settledFile } from '../fixtures/job-runner'
import { listen } from '../fixtures/live-server'
import { createTestApp, type TestApp } from '../fixtures/test-app'
import { tusUpload } from '../fixtures/tus-upload'

// Sized so that the tables below sit on either side of it (see each test).
const QUOTA = 1_750_000
let t: TestApp
let live: Awaited<ReturnType<typeof listen>>
let runner: JobRunner
let token: string
let member: IUser
let projectId: number

beforeAll(async () => {
  t = await createTestApp({
    INGEST_MAX_EXPANSION: '50',
    INGEST_MAX_ROWS: '20000',
    PROJECT_QUOTA_BYTES: String(QUOTA),
  })
  live = await listen(t.app)
  runner = startJobRunner(t)
  const em = t.em()
  member = await buildMember(em)
  token = await tokenFor(em, member)
  projectId = (await buildProject(em, [{ user: member, role: 'member' }])).id
})
afterAll(async () => {
  await runner.stop()
  await live.close()
  await t.close()
})

/** A table of `rows` rows; frame, x, y and photons in nm, so it is ingested without asking. */
const table = (rows: number, vary = true) =>
  'frame,x [nm],y [nm],photons\n' +
  Array.from({ length: rows }, (_, i) =>
    vary ? `${i + 1},${(i * 7.3) % 5000},${(i * 3.1) % 5000},${1000 + (i % 97)}` : '1,1,1,1',
  ).join('\n') +
  '\n'

async function deposit(name: string, bytes: Buffer, project = projectId): Promise<IDatasetFile> {
  const dataset = await buildDataset(t.em(), project)
  const res = await tusUpload(`${live.url}/api/uploads`, token, bytes, {
    dataset: dataset.accession,
    filename: name,
  })
  if (!res.fileId) throw new Error(`upload refused: ${res.status} ${res.body}`)
  return settledFile(t, Number(res.fileId), 25_000)
}

describe('limits of one table', () => {
  it('stops a gzip that expands past the allowed ratio, saying why', async () => {
    // 15 000 rows (within the row limit) of long, repetitive numbers: about 1.7 MB of text from
    // a few kB of gzip, a ratio in the hundreds.
    const row = `1,${'1.'.padEnd(100, '0')},1,1\n`
    const text = `frame,x [nm],y [nm],photons\n${row.repeat(15_000)}`
    const bomb = gzipSync(text)
    expect(bomb.length * 50).toBeLessThan(text.length)
    const file = await deposit('bomb.csv.gz', bomb)
    expect(file.status).toBe('rejected')
    expect(file.problem).toMatch(/expands to more than 50 times/)
    expect(file.derivedBytes).toBe(0)
  })

  it('stops a table with more rows than allowed', async () => {
    const file = await deposit('long.csv', Buffer.from(table(25_000)))
    expect(file.status).toBe('rejected')
    expect(file.problem).toMatch(/more than 20,000 rows/)
  })

  it('counts derived bytes against the quota, and stops an ingest that would not fit', async () => {
    // A project of its own, so the earlier tests' files do not count here.
    const ownProject = (await buildProject(t.em(), [{ user: member, role: 'member' }])).id
    const first = await deposit('fits.csv', Buffer.from(table(15_000)), ownProject)
    expect(first.status).toBe('ready')
    // Four columns, at least 4 bytes a value each.
    expect(first.derivedBytes).toBeGreaterThan(15_000 * 16)
    // The first table and its store leave less than the second table's store needs (its upload
    // itself still fits).
    const second = await deposit('too-big.csv', Buffer.from(table(19_000)), ownProject)
    expect(second.status).toBe('rejected')
    expect(second.problem).toMatch(/what is left of the project's quota/)
    // Two ingests and a quality report in fresh threads: past 30 s on a busy machine.
  }, 60_000)

  it('ends the thread that ran an ingest, so its memory goes back', async () => {
    await deposit('small.csv', Buffer.from(table(100)))
    // The ingest is followed by the table's quality report; wait for all work to end.
    const end = Date.now() + 60_000
    const active = () => t.em().count(Job, { state: { $in: ['queued', 'running'] } })
    while ((runner.threads > 0 || (await active()) > 0) && Date.now() < end)
      await new Promise((r) => setTimeout(r, 50))
    expect(await active()).toBe(0)
    expect(runner.threads).toBe(0)
  }, 90_000)
})
