import { describe, expect, it } from 'vitest'
import type { Localizations } from '@server/compute/localizations.types'
import { createRandom } from '@server/compute/simulate'
import { densityStatistics, nyquistResolutionNm } from '@server/compute/statistics'

/** n points uniform on a disk (radius √u · R, angle uniform), fixed seed. */
function disk(n: number, radiusNm: number, seed: number): Localizations {
  const random = createRandom(seed)
  const x = new Float64Array(n)
  const y = new Float64Array(n)
  for (let i = 0; i < n; i++) {
    const r = radiusNm * Math.sqrt(random.uniform())
    const angle = 2 * Math.PI * random.uniform()
    x[i] = 5000 + r * Math.cos(angle)
    y[i] = 5000 + r * Math.sin(angle)
  }
  return { count: n, x, y, frame: new Uint32Array(n) }
}

describe('Nyquist resolution from density (DOMAIN.md §1.5 check values [S])', () => {
  it('10 000 molecules/µm² in 2D ↔ R = 20 nm', () => {
    expect(nyquistResolutionNm(10_000)).toBeCloseTo(20, 10)
  })

  it('four times the density halves the resolution (R ∝ density^−1/2)', () => {
    expect(nyquistResolutionNm(40_000)).toBeCloseTo(10, 10)
  })
})

describe('densityStatistics', () => {
  it('the occupied area of a densely filled disk is its area π r² plus at most the rim', () => {
    // r = 3 µm: 28.27 µm², 3.5 million points, about 50 per 20 nm pixel, so every pixel inside is
    // hit (miss chance e^−50). Pixels cut by the rim add at most the Minkowski sum of the disk
    // with one pixel: π r² + 4 a r + a² on average (a = pixel; geometry), here +0.85 %.
    const r = 3000
    const result = densityStatistics(disk(3_500_000, r, 41)).value
    const area = (Math.PI * r * r) / 1e6
    const rimBound = (Math.PI * r * r + 4 * 20 * r + 20 * 20) / 1e6
    expect(result?.pixelNm).toBe(20)
    expect(result?.occupiedAreaUm2).toBeGreaterThan(area)
    expect(result?.occupiedAreaUm2).toBeLessThan(rimBound)
    expect(result?.counted).toBe(3_500_000)
    expect(result?.densityPerUm2).toBeCloseTo(3_500_000 / (result?.occupiedAreaUm2 ?? 1), 6)
    expect(result?.countingUnit).toBe('raw localizations')
  })

  it('counts merged events instead of rows when given, and says so', () => {
    const result = densityStatistics(disk(400_000, 1000, 42), { mergedEvents: 31_416 }).value
    expect(result?.countingUnit).toBe('merged events')
    // ≈ 10 000 per µm² over π µm² → R ≈ 20 nm (§1.5).
    expect(result?.nyquistResolutionNm).toBeCloseTo(20, 0)
  })

  it('rows without a finite position are left out; none at all gives a reason', () => {
    const t = disk(1000, 500, 43)
    t.x[0] = NaN
    expect(densityStatistics(t).value?.counted).toBe(999)
    const empty = densityStatistics({ ...t, x: new Float64Array(1000).fill(NaN) })
    expect(empty.value).toBeNull()
    expect(empty.reason).toMatch(/finite position/)
  })
})

describe('occupancy grid placed from a sample', () => {
  it('a lone localization far outside the sampled range is still counted (second pass)', () => {
    const t = disk(100_000, 500, 44)
    t.x[12_345] = 60_000 // one row in 100 000: the systematic sample of 16 384 rows misses it
    t.y[12_345] = -20_000
    const result = densityStatistics(t).value
    expect(result?.counted).toBe(100_000)
    // The disk (r = 500 nm) fills π r²/a² ≈ 1963 pixels, plus up to (4 a r + a²)/a² ≈ 101 cut by
    // its rim (see above); the lone row adds one.
    expect(result?.occupiedPixels).toBeGreaterThan(1963 + 1)
    expect(result?.occupiedPixels).toBeLessThan(1963 + 101 + 1)
    expect(result?.boundingBoxAreaUm2).toBeGreaterThan(55 * 24)
  })
})
