/**
 * The validation report of a localization table follows the preview right, never carries a server
 * path, and shows the table's own text (first rows, rejected records) only to those who may
 * download the file. On the code before this guard, anyone could read an embargoed table's first
 * rows and the server's absolute paths from it.
 */
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { fileValidationSchema } from '@shared/schemas/file-report.schema'
import type { JobRunner } from '@server/jobs/job-runner'
import { Dataset } from '@server/modules/datasets/dataset.entity'
import { bearer, buildSharedDraft } from '../fixtures/builders'
import { startJobRunner, settledFile } from '../fixtures/job-runner'
import { listen } from '../fixtures/live-server'
import { createTestApp, type TestApp } from '../fixtures/test-app'
import { tusUpload } from '../fixtures/tus-upload'

let t: TestApp
let live: Awaited<ReturnType<typeof listen>>
let runner: JobRunner
const tokens: Record<string, string> = {}
let dataset: { id: number; accession: string }
let fileId: number
const SECRET_ROW = '7,4242.5,9191.25,1234'

beforeAll(async () => {
  t = await createTestApp()
  live = await listen(t.app)
  runner = startJobRunner(t)
  const built = await buildSharedDraft(t.em(), {
    previewer: ['preview'],
    downloader: ['preview', 'download'],
  })
  dataset = built.dataset
  Object.assign(tokens, built.tokens)

  const table = `frame,x [nm],y [nm],photons\n${SECRET_ROW}\n8,not-a-number,10,5\n9,100,200,300\n`
  const res = await tusUpload(`${live.url}/api/uploads`, tokens.member!, Buffer.from(table), {
    dataset: dataset.accession,
    filename: 'secret.csv',
  })
  fileId = Number(res.fileId)
  await settledFile(t, fileId)
})
afterAll(async () => {
  await runner.stop()
  await live.close()
  await t.close()
})

const setState = (state: 'draft' | 'submitted' | 'approved', embargoUntil: Date | null = null) =>
  t.em().nativeUpdate(Dataset, { id: dataset.id }, { state, embargoUntil })
const report = (who?: string) => {
  const req = request(t.app).get(`/api/datasets/${dataset.accession}/files/${fileId}/validation`)
  return who ? req.set(bearer(tokens[who]!)) : req
}

describe('the validation report of a table', () => {
  it('is closed to those who may not preview: signed out and outsiders on an embargoed dataset', async () => {
    await setState('approved', new Date(Date.now() + 30 * 86400_000))
    const signedOut = await report()
    expect(signedOut.status).toBe(403)
    expect(signedOut.text).not.toContain('4242.5')
    expect(signedOut.headers['content-type']).toContain('application/problem+json')
    expect((await report('outsider')).status).toBe(403)
    await setState('submitted')
    expect((await report('outsider')).status).toBe(404)
    expect((await report()).status).toBe(404)
  })

  it('holds no server path for anyone, and matches the documented schema', async () => {
    await setState('submitted')
    for (const who of ['member', 'previewer', 'downloader']) {
      const res = await report(who)
      expect(res.status).toBe(200)
      expect(res.text).not.toContain(t.config.dataDir)
      expect(res.text).not.toMatch(/arrowPath|indexPath|"\/[a-z]+\//)
      expect(fileValidationSchema.safeParse(res.body).success).toBe(true)
    }
  })

  it('shows the first rows and rejected records only to those who may download', async () => {
    await setState('submitted')
    const previewOnly = await report('previewer')
    expect(previewOnly.body.report.rowsRejected).toBe(1)
    expect(previewOnly.body.report.sniff.sampleRows).toEqual([])
    // Column ranges are statistics anyone who may preview sees; the row's text (quoted) is not.
    expect(previewOnly.text).not.toContain('"4242.5"')
    expect(previewOnly.text).not.toContain('not-a-number')
    expect(previewOnly.body.report.rejected.not_a_number.examples[0].line).toBe(3)

    const full = await report('downloader')
    expect(full.body.report.sniff.sampleRows[0]).toEqual(SECRET_ROW.split(','))
    expect(full.text).toContain('not-a-number')
  })

  it('is open to the public once the dataset is released, rows included as downloads are open', async () => {
    await setState('approved')
    const res = await report()
    expect(res.status).toBe(200)
    // Released: the public may download, so the table's text is theirs to see as well.
    expect(res.body.report.sniff.sampleRows.length).toBeGreaterThan(0)
  })
})
