/**
 * The quality of a dataset's tables in one request: one row per localization table of that
 * dataset only, with the numbers of its report and its verdicts, under the preview right with the
 * embargo rules of the per-file report.
 */
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import {
  datasetQualitySchema,
  type DatasetQualityItem,
  type QualityReportDto,
} from '@shared/schemas/quality.schema'
import { simulateLocalizations } from '@server/compute/simulate'
import { localizationsToCsv } from '@server/compute/simulate/table-text'
import type { JobRunner } from '@server/jobs/job-runner'
import { Dataset } from '@server/modules/datasets/dataset.entity'
import { DatasetFile } from '@server/modules/files/dataset-file.entity'
import { bearer, buildDataset, buildSharedDraft } from '../fixtures/builders'
import { startJobRunner } from '../fixtures/job-runner'
import { listen } from '../fixtures/live-server'
import { createTestApp, type TestApp } from '../fixtures/test-app'
import { tusUpload } from '../fixtures/tus-upload'

let t: TestApp
let live: Awaited<ReturnType<typeof listen>>
let runner: JobRunner
const tokens: Record<string, string> = {}
let dataset: { id: number; accession: string; project: number }
let tableId: number
let blobId: number

const summary = (who?: string, accession = dataset.accession) => {
  const req = request(t.app).get(`/api/datasets/${accession}/quality`)
  return who ? req.set(bearer(tokens[who]!)) : req
}
async function upload(name: string, bytes: Buffer): Promise<number> {
  const res = await tusUpload(`${live.url}/api/uploads`, tokens.member!, bytes, {
    dataset: dataset.accession,
    filename: name,
  })
  return Number(res.fileId)
}

beforeAll(async () => {
  t = await createTestApp()
  live = await listen(t.app)
  runner = startJobRunner(t)
  const built = await buildSharedDraft(t.em(), { previewer: ['preview'], reader: [] })
  dataset = built.dataset
  Object.assign(tokens, built.tokens)
  const { localizations } = simulateLocalizations({
    seed: 5,
    fieldNm: 4000,
    emitters: 2000,
    frames: 1200,
    structure: { kind: 'rings' },
    precision: { mode: 'fixed', sigmaNm: 9 },
  })
  tableId = await upload('rings.csv', Buffer.from(localizationsToCsv(localizations)))
  // Bytes that are no text at all: stored as an "other" file, which has no quality report.
  blobId = await upload(
    'blob.bin',
    Buffer.from(Array.from({ length: 512 }, (_, i) => (i * 131) % 256)),
  )
}, 60_000)
afterAll(async () => {
  await runner.stop()
  await live.close()
  await t.close()
})

async function settledSummary(): Promise<DatasetQualityItem[]> {
  const end = Date.now() + 90_000
  for (;;) {
    const res = await summary('member')
    expect(res.status).toBe(200)
    const items: DatasetQualityItem[] = datasetQualitySchema.parse(res.body).items
    if (items.every((i) => i.status === 'done' || i.status === 'failed')) return items
    if (Date.now() > end) throw new Error('reports still computing')
    await new Promise((r) => setTimeout(r, 200))
  }
}

describe('the quality summary of a dataset', () => {
  let items: DatasetQualityItem[]
  beforeAll(async () => {
    items = await settledSummary()
  }, 120_000)

  it('has one row per localization table, with the numbers of its report', async () => {
    expect(items.map((i) => i.fileId)).toEqual([tableId])
    expect(items.map((i) => i.fileId)).not.toContain(blobId)
    const report: QualityReportDto = (
      await request(t.app)
        .get(`/api/datasets/${dataset.accession}/files/${tableId}/quality`)
        .set(bearer(tokens.member!))
    ).body
    const [row] = items
    expect(row).toMatchObject({
      fileName: 'rings.csv',
      status: 'done',
      computedAt: report.computedAt,
      localizations: report.localizations,
      precisionMedianNm: report.precisionMedianNm,
      frcResolutionNm: report.frcResolutionNm,
      driftNm: report.driftNm,
    })
    expect(row!.localizations).toBeGreaterThan(0)
  })

  it('carries the verdicts in words, one chip per judged aspect', () => {
    const chips = items[0]!.verdicts
    expect(chips.length).toBeGreaterThan(0)
    expect(new Set(chips.map((c) => c.key)).size).toBe(chips.length)
    // The uncertainty column states 9 nm and the photons predict a precision: it is judged.
    const precision = chips.find((c) => c.key === 'precision')
    expect(precision?.title).toBe('Precision')
    expect(precision?.text).toMatch(/photon/)
    for (const chip of chips) expect(chip.text.length).toBeGreaterThan(10)
  })

  it('lists only the tables of that dataset, and says what a table still waits for', async () => {
    const em = t.em()
    const other = await buildDataset(em, dataset.project)
    const waiting = em.create(DatasetFile, {
      dataset: other.id,
      name: 'later.csv',
      size: 10,
      storageKey: `test-${other.id}-later`,
      kind: 'localization_table',
      status: 'processing',
    })
    await em.flush()
    const res = await summary('member', other.accession)
    expect(res.status).toBe(200)
    expect(res.body.items).toEqual([
      expect.objectContaining({
        fileId: waiting.id,
        status: 'queued',
        message: 'Waiting for the table to be read.',
        localizations: null,
        verdicts: [],
      }),
    ])
    expect((await summary('member')).body.items.map((i: DatasetQualityItem) => i.fileId)).toEqual([
      tableId,
    ])
  })
})

describe('who may read it', () => {
  it('follows the preview right: collaborators with it, not readers, nobody else', async () => {
    expect((await summary('previewer')).status).toBe(200)
    expect((await summary('reader')).status).toBe(403)
    expect((await summary('outsider')).status).toBe(404)
    expect((await summary()).status).toBe(404)
  })

  it('keeps an embargoed dataset closed to the public, and opens it once released', async () => {
    const future = new Date(Date.now() + 30 * 86_400_000)
    await t
      .em()
      .nativeUpdate(Dataset, { id: dataset.id }, { state: 'approved', embargoUntil: future })
    expect((await summary()).status).toBe(403)
    await t.em().nativeUpdate(Dataset, { id: dataset.id }, { embargoUntil: null })
    const open = await summary()
    expect(open.status).toBe(200)
    expect(open.body.items).toHaveLength(1)
    await t.em().nativeUpdate(Dataset, { id: dataset.id }, { state: 'draft' })
  })
})
