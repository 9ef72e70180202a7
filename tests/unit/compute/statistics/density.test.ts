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
  it('the occupied area of a densely filled disk is its area π r² (within 2 %)', () => {
    // 1 µm radius: 3.1416 µm²; 400 000 points, about 50 per 20 nm pixel, so every inner pixel
    // is hit; the rim adds at most half a pixel times the circumference (about 1 %).
    const result = densityStatistics(disk(400_000, 1000, 41)).value
    expect(result?.pixelNm).toBe(20)
    expect((result?.occupiedAreaUm2 ?? 0) / Math.PI).toBeGreaterThan(0.99)
    expect((result?.occupiedAreaUm2 ?? 0) / Math.PI).toBeLessThan(1.02)
    expect(result?.counted).toBe(400_000)
    expect(result?.densityPerUm2).toBeCloseTo(400_000 / (result?.occupiedAreaUm2 ?? 1), 6)
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
