import { describe, expect, it } from 'vitest'
import {
  axialDiffractionLimitNm,
  excessNoiseForDetector,
  numericalApertureProblem,
  pixelSizeAtSampleNm,
} from '@shared/domain/optics'
import { metadataSchema } from '@shared/metadata/metadata.schema'
import type { Localizations } from '@server/compute/localizations.types'
import { precisionStatistics } from '@server/compute/statistics'

describe('axial diffraction limit 2nλ/NA²', () => {
  it('DOMAIN.md §6 [S]: 670 nm, NA 1.49, n 1.518 → 916 nm', () => {
    expect(axialDiffractionLimitNm(670, 1.49, 1.518)).toBeCloseTo(916, 0)
  })

  it('textbook example (form from Murphy & Davidson, Fundamentals of Light Microscopy; recalled from memory [M]): 550 nm, NA 1.4, oil n 1.515 → 850.3 nm by arithmetic', () => {
    // 2 · 1.515 · 550 / 1.4² = 1666.5 / 1.96 = 850.26 nm.
    expect(axialDiffractionLimitNm(550, 1.4, 1.515)).toBeCloseTo(850.26, 2)
  })

  it('is about 3–4× the lateral Abbe limit at high NA (DOMAIN.md §2: axial 2–3× worse precision)', () => {
    const lateral = 670 / (2 * 1.49)
    expect(axialDiffractionLimitNm(670, 1.49, 1.518) / lateral).toBeGreaterThan(3.5)
  })

  it('refuses an NA above the refractive index', () => {
    expect(() => axialDiffractionLimitNm(670, 1.49, 1.333)).toThrow(RangeError)
  })
})

describe('NA against the immersion medium', () => {
  it('refuses NA 1.49 with water (n 1.333) but accepts NA 1.65 in a high-index medium of n 1.78 (DOMAIN.md §6, [M])', () => {
    expect(numericalApertureProblem(1.49, 'Water')).toMatch(/impossible/)
    expect(numericalApertureProblem(1.65, 'Oil')).toMatch(/impossible/)
    expect(numericalApertureProblem(1.65, 'Oil', 1.78)).toBeNull()
    expect(numericalApertureProblem(1.7, 'Other', 1.66)).toMatch(/n = 1.66/)
  })

  it('the description checks NA against the stated refractive index when given', () => {
    const described = (objective: Record<string, unknown>) =>
      metadataSchema.safeParse({ instrument: { objective } }).success
    expect(described({ lensNA: 1.65, immersion: 'Oil' })).toBe(false)
    expect(described({ lensNA: 1.65, immersion: 'Oil', immersionRefractiveIndex: 1.78 })).toBe(true)
    expect(described({ lensNA: 1.65, immersion: 'Other', immersionRefractiveIndex: 1.6 })).toBe(
      false,
    )
  })
})

describe('pixel at the sample from the total magnification', () => {
  it('DOMAIN.md §6 [S]: 16 µm / (100 × 1.5) = 106.7 nm; §1.3: 16 µm / 100× = 160 nm', () => {
    expect(pixelSizeAtSampleNm(16, 100 * 1.5)).toBeCloseTo(106.67, 2)
    expect(pixelSizeAtSampleNm(16, 100)).toBe(160)
  })
})

describe('excess noise by detector', () => {
  it('EMCCD, intensified and electron-bombarded CCDs double the variance; sCMOS and CCD do not (§6)', () => {
    expect(['EMCCD', 'IntensifiedCCD', 'EBCCD'].map(excessNoiseForDetector)).toEqual([2, 2, 2])
    expect(['CMOS', 'CCD', undefined].map(excessNoiseForDetector)).toEqual([1, 1, 1])
  })
})

function spots(count: number, sigma?: number): Localizations {
  return {
    count,
    x: new Float64Array(count),
    y: new Float64Array(count),
    frame: new Uint32Array(count),
    photons: new Float32Array(count).fill(1000),
    background: new Float32Array(count).fill(10),
    ...(sigma === undefined ? {} : { sigma: new Float32Array(count).fill(sigma) }),
  }
}

describe('expected precision of a table: which PSF width', () => {
  // DOMAIN.md §1.1 table [S]: s = a = 100, N = 1000, b² = 10 → Thompson 3.653 nm.
  it('the measured sigma column beats the described width', () => {
    const p = precisionStatistics(spots(11, 100), { pixelNm: 100, psfSigmaNm: 150 })
    expect(p.value?.expectedMedianNm).toBeCloseTo(3.653, 2)
    expect(p.parameters.psfSigmaSource).toBe('median of the sigma column')
  })

  it("without a sigma column, the description's fitted width is used", () => {
    const p = precisionStatistics(spots(11), { pixelNm: 100, psfSigmaNm: 100 })
    expect(p.value?.expectedMedianNm).toBeCloseTo(3.653, 2)
    expect(p.parameters.psfSigmaSource).toBe("the description's fitted PSF width")
  })

  it('else the ideal 0.21 λ/NA, named a lower bound: 700 nm at NA 1.47 is s = 100 nm', () => {
    const p = precisionStatistics(spots(11), {
      pixelNm: 100,
      emissionNm: 700,
      numericalAperture: 1.47,
    })
    expect(p.parameters.psfSigmaNm).toBeCloseTo(100, 9)
    expect(p.value?.expectedMedianNm).toBeCloseTo(3.653, 2)
    expect(String(p.parameters.psfSigmaSource)).toContain('lower bound')
  })

  it('DOMAIN.md §6: Thompson at s = 130 instead of the ideal 94 goes from 3.43 to 4.99 nm', () => {
    // The §6 pair is for a = 100, N = 1000, b² = 10; the ideal 94.4 = 0.21 · 670/1.49.
    const ideal = precisionStatistics(spots(11), {
      pixelNm: 100,
      emissionNm: 670,
      numericalAperture: 1.49,
    })
    const measured = precisionStatistics(spots(11, 130), { pixelNm: 100 })
    expect(ideal.value?.expectedMedianNm).toBeCloseTo(3.43, 1)
    expect(measured.value?.expectedMedianNm).toBeCloseTo(4.99, 1)
  })

  it('says why when no width is known at all', () => {
    const p = precisionStatistics(spots(11), { pixelNm: 100 })
    expect(p.value).toBeNull()
    expect(p.reason).toMatch(/PSF width is unknown/)
  })
})

describe('expected precision of a table: camera noise', () => {
  it('an intensified CCD uses Mortensen MLE with F = 2: 5.788 nm (§1.1 table, F = 2)', () => {
    const p = precisionStatistics(spots(11, 100), { pixelNm: 100, detector: 'iccd' })
    expect(p.value?.expectedMedianNm).toBeCloseTo(5.788, 2)
    expect(p.parameters.excessNoise).toBe(2)
  })

  it('read noise adds to b² for sCMOS, not behind EM gain', () => {
    // b² = 10 + (√10)² = 20 → Thompson(s = a = 100, N = 1000, b² = 20), by the §1.1 formula.
    const thompson20 = Math.sqrt(
      (100 ** 2 + 100 ** 2 / 12) / 1000 + (8 * Math.PI * 1e8 * 20) / (1e4 * 1e6),
    )
    const scmos = precisionStatistics(spots(11, 100), {
      pixelNm: 100,
      detector: 'scmos',
      readNoisePhotons: Math.sqrt(10),
    })
    expect(scmos.value?.expectedMedianNm).toBeCloseTo(thompson20, 3)
    const emccd = precisionStatistics(spots(11, 100), {
      pixelNm: 100,
      detector: 'emccd',
      readNoisePhotons: Math.sqrt(10),
    })
    expect(emccd.value?.expectedMedianNm).toBeCloseTo(5.788, 2)
  })
})
