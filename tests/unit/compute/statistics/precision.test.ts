import { describe, expect, it } from 'vitest'
import {
  EMCCD_EXCESS_NOISE,
  mortensenMlePrecisionNm,
  thompsonPrecisionNm,
} from '@shared/domain/optics'
import type { Localizations } from '@server/compute/localizations.types'
import { createRandom, simulateLocalizations } from '@server/compute/simulate'
import { expectedPrecision, precisionStatistics } from '@server/compute/statistics'

const model = (formula: 'thompson' | 'mortensen-mle' | 'mortensen-lsq', excessNoise = 1) =>
  expectedPrecision({ formula, psfSigmaNm: 100, pixelNm: 100, excessNoise })

describe('expected precision per localization against DOMAIN.md §1.1 (s = a = 100 nm, N = 1000)', () => {
  // Table of §1.1 [S values of C/M forms]; tolerance 0.01 nm as §1.1 asks.
  it.each([
    ['thompson', 1, 0, 3.291],
    ['thompson', 1, 10, 3.653],
    ['mortensen-lsq', 1, 0, 4.389],
    ['mortensen-lsq', 1, 10, 4.713],
    ['mortensen-mle', 1, 0, 3.291],
    ['mortensen-mle', 1, 10, 4.093],
    ['mortensen-lsq', 2, 0, 6.206],
    ['mortensen-lsq', 2, 10, 6.665],
    ['mortensen-mle', 2, 0, 4.654],
    ['mortensen-mle', 2, 10, 5.788],
  ] as const)('%s, F = %d, b² = %d → %d nm', (formula, f, b2, expected) => {
    expect(Math.abs(model(formula, f)(1000, b2) - expected)).toBeLessThan(0.01)
  })

  it('without background and with a vanishing pixel: s/√N = 3.162 nm (§1.1, [C])', () => {
    const tiny = expectedPrecision({
      formula: 'thompson',
      psfSigmaNm: 100,
      pixelNm: 1e-3,
      excessNoise: 1,
    })
    expect(tiny(1000, 0)).toBeCloseTo(100 / Math.sqrt(1000), 3)
  })

  it('the MLE table agrees with the shared formula to 1e-5 relative over wide inputs', () => {
    const random = createRandom(31)
    const fast = expectedPrecision({
      formula: 'mortensen-mle',
      psfSigmaNm: 130,
      pixelNm: 108,
      excessNoise: EMCCD_EXCESS_NOISE,
    })
    let worst = 0
    for (let i = 0; i < 5000; i++) {
      const n = 10 * 1e5 ** random.uniform()
      const b2 = i % 10 === 0 ? 0 : 0.01 * 1e6 ** random.uniform()
      const direct = mortensenMlePrecisionNm({ s: 130, a: 108, n, b2, excessNoise: 2 })
      worst = Math.max(worst, Math.abs(fast(n, b2) / direct - 1))
    }
    expect(worst).toBeLessThan(1e-5)
  })

  it('rows without photons give NaN, not a throw', () => {
    expect(model('thompson')(0, 10)).toBeNaN()
    expect(model('mortensen-mle')(NaN, 10)).toBeNaN()
    expect(model('thompson')(1000, -1)).toBeNaN()
  })
})

function spots(photons: number[], background: number[], sigma: number): Localizations {
  const count = photons.length
  return {
    count,
    x: new Float64Array(count),
    y: new Float64Array(count),
    frame: new Uint32Array(count),
    photons: Float32Array.from(photons),
    background: Float32Array.from(background),
    sigma: new Float32Array(count).fill(sigma),
  }
}

describe('precisionStatistics', () => {
  it('reads the background column as b² (a level of 10 photons/px is b² = 10, DOMAIN.md §1.1)', () => {
    const t = spots(new Array(101).fill(1000), new Array(101).fill(10), 100)
    const p = precisionStatistics(t, { pixelNm: 100 }).value
    expect(p?.source).toBe('expected from photons')
    expect(Math.abs((p?.medianNm ?? 0) - 3.653)).toBeLessThan(0.01)
    // Taking b = √10 as b² would give Thompson(b² = √10) ≈ 3.41 nm instead.
    expect(p?.expectedFormula).toMatch(/Thompson/)
  })

  it('read noise adds its square to b²: background 0 and read noise √10 give 3.653 nm', () => {
    const t = spots(new Array(11).fill(1000), new Array(11).fill(0), 100)
    const p = precisionStatistics(t, { pixelNm: 100, readNoisePhotons: Math.sqrt(10) }).value
    expect(Math.abs((p?.medianNm ?? 0) - 3.653)).toBeLessThan(0.01)
  })

  it('EMCCD tables use Mortensen MLE with F = 2: 5.788 nm at b² = 10 (§1.1)', () => {
    const t = spots(new Array(11).fill(1000), new Array(11).fill(10), 100)
    const p = precisionStatistics(t, { pixelNm: 100, detector: 'emccd' }).value
    expect(p?.expectedFormula).toMatch(/maximum likelihood/)
    expect(Math.abs((p?.medianNm ?? 0) - 5.788)).toBeLessThan(0.01)
  })

  it('expected median equals the exact median of per-row Thompson values (direct calls)', () => {
    const random = createRandom(32)
    const photons = Array.from({ length: 20_001 }, () => random.logNormal(800, 0.7))
    const background = Array.from({ length: 20_001 }, () => random.logNormal(20, 0.3))
    const t = spots(photons, background, 120)
    const p = precisionStatistics(t, { pixelNm: 110 }).value
    const exact = photons
      .map((n, i) =>
        thompsonPrecisionNm({
          s: 120,
          a: 110,
          n: Math.fround(n),
          b2: Math.fround(background[i] ?? 0),
        }),
      )
      .sort((a, b) => a - b)
    const median = exact[Math.ceil(exact.length / 2) - 1] ?? NaN
    expect(Math.abs((p?.medianNm ?? 0) - median)).toBeLessThanOrEqual(
      (p?.distribution.quantileResolution ?? 0) + 1e-6,
    )
  })

  it('a simulated Thompson table measures as predicted: ratio of medians ≈ 1 (ground truth)', () => {
    // The simulator writes Thompson precision with PSF SD 130 nm; fitted widths scatter 5 % around
    // it, so the median of the sigma column recovers it.
    const { localizations: t } = simulateLocalizations({ emitters: 20_000, seed: 33, pixelNm: 108 })
    const p = precisionStatistics(t, { pixelNm: 108 }).value
    expect(p?.source).toBe('uncertainty column')
    expect(p?.measuredToExpected).toBeGreaterThan(0.99)
    expect(p?.measuredToExpected).toBeLessThan(1.01)
  })

  it('a column twice as wide as the photons predict gives a ratio near 2', () => {
    const { localizations: t } = simulateLocalizations({ emitters: 20_000, seed: 34, pixelNm: 108 })
    const doubled = { ...t, uncertainty: (t.uncertainty ?? new Float32Array()).map((u) => 2 * u) }
    const p = precisionStatistics(doubled, { pixelNm: 108 }).value
    expect(p?.measuredToExpected).toBeCloseTo(2, 1)
  })

  it('says why when nothing can be computed', () => {
    const bare: Localizations = {
      count: 3,
      x: new Float64Array(3),
      y: new Float64Array(3),
      frame: new Uint32Array(3),
    }
    const none = precisionStatistics(bare, { pixelNm: 100 })
    expect(none.value).toBeNull()
    expect(none.reason).toMatch(/no photon counts/)
    const noPixel = precisionStatistics(spots([1000], [10], 100))
    expect(noPixel.reason).toMatch(/pixel size is unknown/)
  })
})
