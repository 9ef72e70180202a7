/**
 * The quality report through the API: computed as a job after the ingest, served under the preview
 * right, with each metric's method and a reason where it could not be computed. The data are
 * simulated with known ground truth (fixed seeds), so the headline numbers are checked against it.
 */
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { qualityReportSchema, type QualityReportDto } from '@shared/schemas/quality.schema'
import { simulateLocalizations } from '@server/compute/simulate'
import { localizationsToCsv } from '@server/compute/simulate/table-text'
import { Dataset } from '@server/modules/datasets/dataset.entity'
import { DatasetMetadata } from '@server/modules/metadata/dataset-metadata.entity'
import { bearer } from '../fixtures/builders'
import { startSharedDraftApp, type SharedDraftApp } from '../fixtures/shared-draft-app'

let app: SharedDraftApp

beforeAll(async () => {
  app = await startSharedDraftApp({ previewer: ['preview'], reader: [] })
})
afterAll(() => app.close())

const deposit = (name: string, text: string) => app.upload(name, Buffer.from(text))
const quality = (fileId: number, who?: string) => {
  const req = request(app.t.app).get(
    `/api/datasets/${app.dataset.accession}/files/${fileId}/quality`,
  )
  return who ? req.set(bearer(app.tokens[who]!)) : req
}
async function finished(fileId: number): Promise<QualityReportDto> {
  const end = Date.now() + 90_000
  for (;;) {
    const res = await quality(fileId, 'member')
    if (res.body.status === 'done' || res.body.status === 'failed') return res.body
    if (Date.now() > end) throw new Error(`report still ${res.body.status}: ${res.body.message}`)
    await new Promise((r) => setTimeout(r, 200))
  }
}

// Ground truth (simulator, seed 7): filaments, bursts of ~2 frames, each localization displaced by
// a fixed σ of 8 nm, which the table's uncertainty column also states.
const SIGMA_NM = 8
const simulated = simulateLocalizations({
  seed: 7,
  fieldNm: 6000,
  emitters: 6000,
  frames: 3000,
  structure: { kind: 'filaments', count: 8 },
  blinking: { mode: 'bursts', meanBursts: 2, meanBurstFrames: 2 },
  precision: { mode: 'fixed', sigmaNm: SIGMA_NM },
})

describe('the quality report of a localization table', () => {
  let fileId: number
  let report: QualityReportDto

  beforeAll(async () => {
    fileId = await deposit('filaments.csv', localizationsToCsv(simulated.localizations))
    report = await finished(fileId)
  }, 120_000)

  it('is computed after the ingest and matches the documented schema', () => {
    expect(report.status).toBe('done')
    expect(qualityReportSchema.safeParse(report).success).toBe(true)
    expect(report.localizations).toBe(simulated.localizations.count)
    expect(report.computedAt).not.toBeNull()
  })

  it('recovers the simulated precision from the table and from the data (NeNA)', () => {
    // The uncertainty column states 8 nm for every row.
    expect(report.precisionMedianNm).toBeCloseTo(SIGMA_NM, 1)
    // NeNA (Endesfelder 2014) on bursts spanning adjacent frames: within 15 % of the true σ.
    expect(report.nenaPrecisionNm).not.toBeNull()
    expect(Math.abs(report.nenaPrecisionNm! - SIGMA_NM) / SIGMA_NM).toBeLessThan(0.15)
  })

  it('reports FRC, merging, drift and density with their methods', () => {
    expect(report.frcResolutionNm).toBeGreaterThan(SIGMA_NM)
    expect(report.frcResolutionUncorrectedNm).not.toBeNull()
    // Merged events: between the emitters (each gives ≥ 1 burst) and the localizations.
    expect(report.mergedEmitters).toBeGreaterThan(6000)
    expect(report.mergedEmitters).toBeLessThan(simulated.localizations.count)
    expect(report.metrics.frc?.method).toMatch(/Nieuwenhuizen/)
    expect(report.metrics.drift?.method).toMatch(/Wang/)
    expect(report.nyquistResolutionNm).toBeGreaterThan(0)
    // The description (tests/fixtures/metadata.ts) gives 670 nm emission and NA 1.49: Abbe's
    // limit 224.8 nm, DOMAIN.md §1.2's check value.
    expect(report.diffractionLimitNm).toBeCloseTo(224.8, 1)
  })

  it('follows the preview right', async () => {
    expect((await quality(fileId, 'previewer')).status).toBe(200)
    expect((await quality(fileId, 'reader')).status).toBe(403)
    expect((await quality(fileId, 'outsider')).status).toBe(404)
    expect((await quality(fileId)).status).toBe(404)
    await app.t.em().nativeUpdate(Dataset, { id: app.dataset.id }, { state: 'approved' })
    expect((await quality(fileId)).status).toBe(200)
    await app.t.em().nativeUpdate(Dataset, { id: app.dataset.id }, { state: 'draft' })
  })
})

describe('tables the metrics cannot judge', () => {
  it('a single frame: the report is done, and says which metrics could not be computed and why', async () => {
    const rows = Array.from(
      { length: 400 },
      (_, i) => `1,${(i * 37) % 3000},${(i * 91) % 3000},800`,
    )
    const id = await deposit('one-frame.csv', `frame,x [nm],y [nm],photons\n${rows.join('\n')}\n`)
    const report = await finished(id)
    expect(report.status).toBe('done')
    expect(report.localizations).toBe(400)
    expect(report.frcResolutionNm).toBeNull()
    expect(report.metrics.frc?.reason).toBeTruthy()
    expect(report.driftNm).toBeNull()
    expect(report.metrics.drift?.reason).toBeTruthy()
    expect(report.nenaPrecisionNm).toBeNull()
    expect(report.metrics.nena?.reason).toBeTruthy()
  })

  it('a description without wavelength or NA: the diffraction limit says why it is missing', async () => {
    await app.t.em().nativeUpdate(DatasetMetadata, { dataset: app.dataset.id }, { document: {} })
    const rows = Array.from(
      { length: 300 },
      (_, i) => `${1 + (i % 30)},${(i * 37) % 3000},${(i * 91) % 3000}`,
    )
    const id = await deposit('bare.csv', `frame,x [nm],y [nm]\n${rows.join('\n')}\n`)
    const report = await finished(id)
    expect(report.diffractionLimitNm).toBeNull()
    expect(report.metrics.diffraction?.reason).toMatch(/emission wavelength/)
    // Without photons the table's precision cannot be estimated either: said, not invented.
    expect(report.precisionMedianNm).toBeNull()
    expect(report.metrics.precision?.reason).toBeTruthy()
  })

  it('a file that is not a localization table has no report (409, in words)', async () => {
    // Bytes that are no text at all: stored as an "other" file.
    const bytes = Buffer.from(Array.from({ length: 512 }, (_, i) => (i * 131) % 256))
    const id = await app.upload('blob.bin', bytes)
    const res = await quality(id, 'member')
    expect(res.status).toBe(409)
    expect(res.body.detail).toMatch(/not a localization table/)
  })
})
