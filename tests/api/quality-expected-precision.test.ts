/**
 * The description reaches the report's expected precision: the quality job reads the detector
 * type, the fitted PSF width, the read noise, the emission wavelength and NA (and the pixel from
 * chip ÷ total magnification), and the report's expected precision moves the way DOMAIN.md's
 * formulas say. Each table has photons 1000 and a background column but no sigma or uncertainty
 * column, so the expected precision is the same for every row and its median is the formula's
 * value. Expected numbers are DOMAIN.md's check values, computed there by hand, not here.
 */
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { QualityReportDto } from '@shared/schemas/quality.schema'
import { DatasetMetadata } from '@server/modules/metadata/dataset-metadata.entity'
import { bearer } from '../fixtures/builders'
import { completeMetadata } from '../fixtures/metadata'
import { startSharedDraftApp, type SharedDraftApp } from '../fixtures/shared-draft-app'

let app: SharedDraftApp

beforeAll(async () => {
  app = await startSharedDraftApp({})
})
afterAll(() => app.close())

/**
 * 400 localizations over 20 frames, every one with N = 1000 photons and the given background;
 * `shift` moves them so that no two deposits are the same file.
 */
function table(background: number, shift: number): string {
  const rows = Array.from(
    { length: 400 },
    (_, i) => `${1 + (i % 20)},${shift + ((i * 37) % 3000)},${(i * 91) % 3000},1000,${background}`,
  )
  return `frame,x [nm],y [nm],photons,background\n${rows.join('\n')}\n`
}

interface Optics {
  detectorType: string
  pixelSizeNm?: number
  tubeLensMagnification?: number
  fittedPsfSigmaNm?: number
  readNoiseE?: number
}

/** The shared fixture's description with these optics (emission 670 nm, NA 1.49 oil, 16 µm, 100×). */
async function describeOptics(optics: Optics) {
  const doc = completeMetadata()
  const { detectorType, pixelSizeNm, tubeLensMagnification, fittedPsfSigmaNm, readNoiseE } = optics
  doc.instrument = {
    ...doc.instrument!,
    objective: { ...doc.instrument!.objective!, tubeLensMagnification },
    detector: {
      ...doc.instrument!.detector!,
      type: detectorType as 'CMOS',
      pixelSizeNm,
      readNoiseE,
    },
  }
  doc.processing = { ...doc.processing, fittedPsfSigmaNm }
  await app.t
    .em()
    .nativeUpdate(DatasetMetadata, { dataset: app.dataset.id }, { document: doc as never })
}

let uploads = 0
async function reportOf(optics: Optics, background: number): Promise<QualityReportDto> {
  await describeOptics(optics)
  uploads += 1
  const fileId = await app.upload(`spots-${uploads}.csv`, Buffer.from(table(background, uploads)))
  const end = Date.now() + 90_000
  for (;;) {
    const res = await request(app.t.app)
      .get(`/api/datasets/${app.dataset.accession}/files/${fileId}/quality`)
      .set(bearer(app.tokens.member!))
    if (res.body.status === 'done' || res.body.status === 'failed') return res.body
    if (Date.now() > end) throw new Error(`report still ${res.body.status}`)
    await new Promise((r) => setTimeout(r, 200))
  }
}

const parametersOf = (report: QualityReportDto) => report.metrics.precision?.parameters ?? {}

describe("the report's expected precision follows the description", () => {
  it('sCMOS with a fitted PSF width of 130 nm: Thompson at s = 130', async () => {
    const report = await reportOf(
      { detectorType: 'CMOS', pixelSizeNm: 100, fittedPsfSigmaNm: 130 },
      10,
    )
    // DOMAIN.md §6 (PSF width): Thompson at s = 130, a = 100, N = 1000, b² = 10 → 4.99 nm.
    expect(report.expectedPrecisionNm).toBeCloseTo(4.99, 2)
    expect(parametersOf(report)).toMatchObject({
      formula: 'Thompson, Larson & Webb 2002',
      psfSigmaNm: 130,
      psfSigmaSource: "the description's fitted PSF width",
      excessNoise: 1,
    })
  }, 120_000)

  it('no fitted width: the ideal 0.21 λ/NA from 670 nm and NA 1.49, pixel from chip ÷ (objective × tube lens)', async () => {
    // 16 µm ÷ (100 × 1.6) = 100 nm at the sample (DOMAIN.md §1.3 and §6 forms).
    const report = await reportOf({ detectorType: 'CMOS', tubeLensMagnification: 1.6 }, 10)
    // DOMAIN.md §6: Thompson with the ideal s ≈ 94 nm (0.21·670/1.49, §1.2), a = 100, N = 1000,
    // b² = 10 → 3.43 nm.
    expect(report.expectedPrecisionNm).toBeCloseTo(3.43, 2)
    expect(parametersOf(report).pixelNm).toBeCloseTo(100, 6)
    expect(parametersOf(report).psfSigmaNm).toBeCloseTo(94.4, 1)
    expect(String(parametersOf(report).psfSigmaSource)).toMatch(/lower bound/)
  }, 120_000)

  it('sCMOS read noise of 1 e⁻ adds 1 to b²: background 9 behaves as b² = 10', async () => {
    const optics = { detectorType: 'CMOS', pixelSizeNm: 100, fittedPsfSigmaNm: 100, readNoiseE: 1 }
    const report = await reportOf(optics, 9)
    // DOMAIN.md §1.1 table: Thompson, s = a = 100, N = 1000, b² = 10 → 3.653 nm (§6: add the read
    // noise squared to b² for sCMOS/CCD).
    expect(report.expectedPrecisionNm).toBeCloseTo(3.653, 2)
    expect(parametersOf(report).readNoisePhotons).toBe(1)
  }, 120_000)

  it.each(['EMCCD', 'IntensifiedCCD'])(
    '%s: Mortensen maximum likelihood with F = 2, the read noise left out',
    async (detectorType) => {
      const optics = { detectorType, pixelSizeNm: 100, fittedPsfSigmaNm: 100, readNoiseE: 3 }
      const report = await reportOf(optics, 10)
      // DOMAIN.md §1.1 table: MLE with F = 2, s = a = 100, N = 1000, b² = 10 → 5.788 nm (§6:
      // intensified CCDs also have excess noise; EM gain hides the read noise).
      expect(report.expectedPrecisionNm).toBeCloseTo(5.788, 2)
      expect(parametersOf(report)).toMatchObject({
        formula: 'Mortensen et al. 2010, maximum likelihood',
        excessNoise: 2,
        readNoisePhotons: 0,
      })
    },
    120_000,
  )
})
