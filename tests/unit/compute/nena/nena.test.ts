// @vitest-environment node
import { describe, expect, it } from 'vitest'
import type { Localizations } from '@server/compute/localizations.types'
import { estimateNenaPrecision, nenaRayleighDensity } from '@server/compute/nena'
import { createRandom, simulateLocalizations } from '@server/compute/simulate'

describe('nenaRayleighDensity — DOMAIN §1.10 check values', () => {
  // DOMAIN.md §1.10 [S] (Endesfelder et al. 2014 form [C]): σ = 10 nm → mode 14.14 nm, mean σ√π = 17.72 nm.
  const step = 0.001
  const grid = Array.from({ length: 200_000 }, (_, k) => (k + 0.5) * step)
  const density = grid.map((d) => nenaRayleighDensity(d, 10))

  it('integrates to 1', () => {
    expect(density.reduce((sum, p) => sum + p * step, 0)).toBeCloseTo(1, 6)
  })

  it('peaks at 14.14 nm', () => {
    const peak = density.reduce((best, p, k) => (p > (density[best] ?? 0) ? k : best), 0)
    expect(grid[peak]).toBeCloseTo(14.14, 2)
  })

  it('has mean 17.72 nm', () => {
    const mean = density.reduce((sum, p, k) => sum + p * (grid[k] ?? 0) * step, 0)
    expect(mean).toBeCloseTo(17.72, 2)
  })
})

describe('estimateNenaPrecision — next-frame neighbours', () => {
  it('bins the same distances as a brute-force O(n²) nearest-neighbour search', () => {
    const random = createRandom(21)
    const n = 600
    const locs: Localizations = {
      count: n,
      x: Float64Array.from({ length: n }, () => random.uniform() * 2000),
      y: Float64Array.from({ length: n }, () => random.uniform() * 2000),
      frame: Uint32Array.from({ length: n }, () => random.integer(12)),
    }
    const result = estimateNenaPrecision(locs, { searchRadiusNm: 150, binNm: 1, minPairs: 0 })
    const expected = new Array<number>(150).fill(0)
    for (let i = 0; i < n; i++) {
      let nearest = Infinity
      for (let j = 0; j < n; j++) {
        if (locs.frame[j] !== (locs.frame[i] ?? 0) + 1) continue
        nearest = Math.min(
          nearest,
          Math.hypot((locs.x[j] ?? 0) - (locs.x[i] ?? 0), (locs.y[j] ?? 0) - (locs.y[i] ?? 0)),
        )
      }
      if (nearest <= 150) expected[Math.min(149, Math.floor(nearest))]! += 1
    }
    expect(result.histogram.counts).toEqual(expected)
    expect(result.pairsUsed).toBe(expected.reduce((a, b) => a + b, 0))
    expect(result.pairsUsed).toBeGreaterThan(20)
  })
})

/** Static emitters blinking in bursts of ~4 frames, each localization off by a fixed σ (simulator). */
function staticEmitters(sigmaNm: number, seed: number) {
  return simulateLocalizations({
    seed,
    fieldNm: 5000,
    emitters: 2000,
    frames: 2000,
    structure: { kind: 'uniform' },
    blinking: { mode: 'bursts', meanBursts: 2, meanBurstFrames: 4 },
    precision: { mode: 'fixed', sigmaNm },
  }).localizations
}

/** Adds `perFrame` uniformly scattered unrelated localizations to every frame. */
function withUniformBackground(
  locs: Localizations,
  perFrame: number,
  frames: number,
  seed: number,
) {
  const random = createRandom(seed)
  const extra = perFrame * frames
  const column = (own: Localizations['x'], make: (k: number) => number) =>
    Float64Array.from({ length: locs.count + extra }, (_, i) =>
      i < locs.count ? (own[i] ?? 0) : make(i - locs.count),
    )
  return {
    count: locs.count + extra,
    x: column(locs.x, () => random.uniform() * 5000),
    y: column(locs.y, () => random.uniform() * 5000),
    frame: column(locs.frame, (k) => k % frames),
  }
}

describe('estimateNenaPrecision on simulated static emitters with known σ', () => {
  // Ground truth from the seeded simulator; the brief's tolerance is 10 %. Measured: within 1 %.
  for (const sigma of [5, 10, 20]) {
    it(`recovers σ = ${sigma} nm within 10 %`, () => {
      const result = estimateNenaPrecision(staticEmitters(sigma, 4))
      expect(result.reason).toBeUndefined()
      expect(result.precisionNm).not.toBeNull()
      expect(Math.abs((result.precisionNm ?? 0) / sigma - 1)).toBeLessThan(0.1)
      expect(result.fitQuality?.rSquared).toBeGreaterThan(0.95)
    })

    it(`stays within 10 % of σ = ${sigma} nm with 2 unrelated localizations per µm² per frame`, () => {
      // 50 per frame on 25 µm², six times the emitters' rows: over half the pairs are unrelated.
      const result = estimateNenaPrecision(
        withUniformBackground(staticEmitters(sigma, 4), 50, 2000, 9),
      )
      expect(result.fitQuality?.rayleighShare).toBeLessThan(0.6)
      expect(Math.abs((result.precisionNm ?? 0) / sigma - 1)).toBeLessThan(0.1)
    })
  }
})

describe('estimateNenaPrecision — data it cannot use', () => {
  it('says so when no two adjacent frames hold localizations', () => {
    const locs = {
      count: 3,
      x: Float64Array.of(0, 1, 2),
      y: Float64Array.of(0, 1, 2),
      frame: Uint32Array.of(0, 2, 4),
    }
    const result = estimateNenaPrecision(locs)
    expect(result.precisionNm).toBeNull()
    expect(result.reason).toMatch(/adjacent frames/)
  })

  it('says so when there are too few pairs, and ignores NaN rows', () => {
    const locs = {
      count: 3,
      x: Float64Array.of(0, 3, Number.NaN),
      y: Float64Array.of(0, 4, 0),
      frame: Uint32Array.of(0, 1, 1),
    }
    const result = estimateNenaPrecision(locs)
    expect(result.precisionNm).toBeNull()
    expect(result.pairsUsed).toBe(1)
    expect(result.parameters.excludedRows).toBe(1)
    expect(result.reason).toMatch(/only 1 /)
  })

  it('refuses a bin wider than the search radius', () => {
    const result = estimateNenaPrecision(staticEmitters(10, 1), { searchRadiusNm: 10, binNm: 20 })
    expect(result.precisionNm).toBeNull()
    expect(result.reason).toMatch(/bin/)
  })

  it('gives no precision when every neighbour is unrelated', () => {
    // Uniform points in every frame, no molecule repeated: no Rayleigh part to find.
    const noise = withUniformBackground(
      { count: 0, x: new Float64Array(0), y: new Float64Array(0), frame: new Uint32Array(0) },
      100,
      400,
      3,
    )
    const result = estimateNenaPrecision(noise)
    expect(result.precisionNm).toBeNull()
    expect(result.reason).toBeDefined()
  })
})
