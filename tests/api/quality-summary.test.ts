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
import { Dataset } from '@server/modules/datasets/dataset.entity'
import { DatasetFile } from '@server/modules/files/dataset-file.entity'
import { bearer, buildDataset } from '../fixtures/builders'
import { startSharedDraftApp, type SharedDraftApp } from '../fixtures/shared-draft-app'

let app: SharedDraftApp
let tableId: number
let blobId: number

const summary = (who?: string, accession = app.dataset.accession) => {
  const req = request(app.t.app).get(`/api/datasets/${accession}/quality`)
  return who ? req.set(bearer(app.tokens[who]!)) : req
}
beforeAll(async () => {
  app = await startSharedDraftApp({ previewer: ['preview'], reader: [] })
  const { localizations } = simulateLocalizations({
    seed: 5,
    fieldNm: 4000,
    emitters: 2000,
    frames: 1200,
    structure: { kind: 'rings' },
    precision: { mode: 'fixed', sigmaNm: 9 },
    // The sigma column: log-normal around 125 nm (5 % spread), so its median is ≈ 125 nm.
    psfSigmaNm: 125,
  })
  tableId = await app.upload('rings.csv', Buffer.from(localizationsToCsv(localizations)))
  // Bytes that are no text at all: stored as an "other" file, which has no quality report.
  blobId = await app.upload(
    'blob.bin',
    Buffer.from(Array.from({ length: 512 }, (_, i) => (i * 131) % 256)),
  )
}, 60_000)
afterAll(() => app.close())

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
      await request(app.t.app)
        .get(`/api/datasets/${app.dataset.accession}/files/${tableId}/quality`)
        .set(bearer(app.tokens.member!))
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

  it("carries the tables' median fitted PSF width, for the expected precision", async () => {
    const body = datasetQualitySchema.parse((await summary('member')).body)
    expect(body.psfSigmaMedianNm).not.toBeNull()
    expect(Math.abs(body.psfSigmaMedianNm! - 125)).toBeLessThan(1)
    // A dataset whose tables have no finished report has none (the waiting table below).
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

  it('lists only the tables of that app.dataset, and says what a table still waits for', async () => {
    const em = app.t.em()
    const other = await buildDataset(em, app.dataset.project)
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
    expect(res.body.psfSigmaMedianNm).toBeNull()
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
    await app.t
      .em()
      .nativeUpdate(Dataset, { id: app.dataset.id }, { state: 'approved', embargoUntil: future })
    expect((await summary()).status).toBe(403)
    await app.t.em().nativeUpdate(Dataset, { id: app.dataset.id }, { embargoUntil: null })
    const open = await summary()
    expect(open.status).toBe(200)
    expect(open.body.items).toHaveLength(1)
    await app.t.em().nativeUpdate(Dataset, { id: app.dataset.id }, { state: 'draft' })
  })
})
