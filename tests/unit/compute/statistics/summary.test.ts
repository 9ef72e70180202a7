import { describe, expect, it } from 'vitest'
import type { Localizations } from '@server/compute/localizations.types'
import { simulateLocalizations } from '@server/compute/simulate'
import {
  densityStatistics,
  distribution,
  localizationsPerFrame,
  precisionStatistics,
  summarizeTable,
  tableStatistics,
} from '@server/compute/statistics'

function table(x: number[], y: number[], frame: number[], z?: number[]): Localizations {
  return {
    count: x.length,
    x: Float64Array.from(x),
    y: Float64Array.from(y),
    frame: Float64Array.from(frame),
    ...(z ? { z: Float64Array.from(z) } : {}),
  }
}

describe('summarizeTable (hand-counted tables)', () => {
  it('counts rows, frames and extremes; NaN positions and frames are left out and counted', () => {
    const t = table([5, -3, NaN, 12], [1, 2, 3, Infinity], [7, 3, 7, NaN], [0, -50, 20, 10])
    const s = summarizeTable(t).value
    expect(s?.count).toBe(4)
    expect(s?.frames).toEqual({ first: 3, last: 7, distinct: 2, invalid: 1 })
    expect(s?.x).toEqual({ min: -3, max: 12, nonFinite: 1 })
    expect(s?.y).toEqual({ min: 1, max: 3, nonFinite: 1 })
    expect(s?.z).toEqual({ min: -50, max: 20, nonFinite: 0 })
  })

  it('an empty table gives a reason', () => {
    const s = summarizeTable(table([], [], []))
    expect(s.value).toBeNull()
    expect(s.reason).toMatch(/no localizations/)
  })

  it('a table without any valid frame still has bounds', () => {
    const s = summarizeTable(table([1, 2], [3, 4], [NaN, -1])).value
    expect(s?.frames).toBeNull()
    expect(s?.x?.max).toBe(2)
  })
})

describe('localizationsPerFrame', () => {
  it('matches a brute-force count per frame and keeps at most the asked number of points', () => {
    const { localizations: t } = simulateLocalizations({ emitters: 3000, frames: 2500, seed: 21 })
    const curve = localizationsPerFrame(t, { maxPoints: 100 }).value
    expect(curve?.startFrame.length).toBeLessThanOrEqual(100)
    const perFrame = new Map<number, number>()
    for (let i = 0; i < t.count; i++) {
      perFrame.set(t.frame[i] ?? -1, (perFrame.get(t.frame[i] ?? -1) ?? 0) + 1)
    }
    curve?.startFrame.forEach((start, p) => {
      let total = 0
      for (let f = start; f < start + (curve.frames[p] ?? 0); f++) total += perFrame.get(f) ?? 0
      expect(curve.total[p]).toBe(total)
      expect(curve.meanPerFrame[p]).toBeCloseTo(total / (curve.frames[p] ?? 1), 12)
    })
    expect(curve?.total.reduce((a, c) => a + c, 0)).toBe(t.count)
  })

  it('recovers a known bleaching time constant from a simulation (ground truth, fixed seed)', () => {
    // One localization per emitter, at a frame drawn from an exponential with mean 2000 frames:
    // the expected count per frame falls as e^(−f/2000). Fit ln(mean per frame) against frame.
    const { localizations: t } = simulateLocalizations({
      emitters: 200_000,
      frames: 10_000,
      seed: 22,
      blinking: { mode: 'bursts', meanBursts: 1, meanBurstFrames: 1, decayFrames: 2000 },
    })
    const curve = localizationsPerFrame(t, { maxPoints: 1000 }).value
    if (!curve) throw new Error('no curve')
    let n = 0
    let sx = 0
    let sy = 0
    let sxx = 0
    let sxy = 0
    curve.meanPerFrame.forEach((mean, p) => {
      const f = (curve.startFrame[p] ?? 0) + ((curve.frames[p] ?? 1) - 1) / 2
      const w = curve.total[p] ?? 0 // Poisson counts: weight ln(count) by the count
      n += w
      sx += w * f
      sy += w * Math.log(mean)
      sxx += w * f * f
      sxy += w * f * Math.log(mean)
    })
    const slope = (n * sxy - sx * sy) / (n * sxx - sx * sx)
    expect(-1 / slope / 2000).toBeGreaterThan(0.97)
    expect(-1 / slope / 2000).toBeLessThan(1.03)
  })

  it('one frame and no rows are handled without throwing', () => {
    const single = localizationsPerFrame(table([1, 2, 3], [1, 2, 3], [4, 4, 4])).value
    expect(single).toMatchObject({ startFrame: [4], total: [3], meanPerFrame: [3] })
    expect(localizationsPerFrame(table([], [], [])).reason).toMatch(/no localizations/)
  })
})

describe('tableStatistics shares passes without changing results', () => {
  it('gives the same summary, density and distributions as the separate functions', () => {
    const { localizations: t } = simulateLocalizations({ emitters: 5000, seed: 23, axial: {} })
    const all = tableStatistics(t, { precision: { pixelNm: 108 } })
    expect(all.summary).toEqual(summarizeTable(t))
    expect(all.density).toEqual(densityStatistics(t))
    expect(all.distributions.photons).toEqual(distribution(t.photons ?? new Float32Array()))
    expect(Object.keys(all.distributions).sort()).toEqual(
      ['background', 'photons', 'sigma', 'uncertainty', 'z'].sort(),
    )
    expect(all.precision).toEqual(precisionStatistics(t, { pixelNm: 108 }))
    // Brute-force extremes.
    expect(all.summary.value?.x?.min).toBe(Math.min(...t.x))
    expect(all.summary.value?.y?.max).toBe(Math.max(...t.y))
  })
})
