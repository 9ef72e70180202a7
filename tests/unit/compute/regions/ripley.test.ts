import { describe, expect, it } from 'vitest'
import { MeasurementLimitError, regionShape, ripley } from '@server/compute/regions'
import { Random } from '@server/compute/simulate'
import { concat, gaussianClusters, rectangle, spacedCentres, uniformPoints } from './point-sets'

const at = (r: number[], values: number[], radius: number) => values[r.indexOf(radius)]!
const params = { steps: 8, simulations: 0, seed: 1, correction: 'translation' as const }

/**
 * Brute-force translation-corrected K for a rectangle window (DOMAIN.md 1.6's formula:
 * w = A / ((W − |dx|)(H − |dy|))), the estimator the pixel method must agree with.
 */
function exactK(x: Float64Array, y: Float64Array, n: number, w: number, h: number, r: number) {
  let sum = 0
  for (let i = 0; i < n; i++)
    for (let j = 0; j < n; j++) {
      if (i === j) continue
      const dx = Math.abs(x[i]! - x[j]!)
      const dy = Math.abs(y[i]! - y[j]!)
      if (dx * dx + dy * dy < r * r) sum += (w * h) / ((w - dx) * (h - dy))
    }
  return ((w * h) / (n * (n - 1))) * sum
}

describe(
  "Ripley's L under complete spatial randomness (DOMAIN.md 1.6 check values)",
  { timeout: 120_000 },
  () => {
    it('20 000 points in 10 × 10 µm: L(50) ≈ 49.9 ± 0.2, L(200) ≈ 200.0 ± 0.2 (translation corrected)', () => {
      const values50: number[] = []
      const values200: number[] = []
      for (const seed of [1, 2, 3, 4, 5]) {
        const p = uniformPoints(20_000, 10_000, 10_000, seed)
        const res = ripley(p.x, p.y, p.count, regionShape(rectangle(0, 0, 10_000, 10_000)), {
          ...params,
          rMax: 200,
          steps: 4,
        })
        values50.push(at(res.r, res.L, 50))
        values200.push(at(res.r, res.L, 200))
      }
      const mean = (v: number[]) => v.reduce((s, x) => s + x, 0) / v.length
      for (const v of values50) expect(Math.abs(v - 49.9)).toBeLessThan(0.7)
      for (const v of values200) expect(Math.abs(v - 200)).toBeLessThan(0.7)
      expect(Math.abs(mean(values50) - 49.9)).toBeLessThan(0.3)
      expect(Math.abs(mean(values200) - 200)).toBeLessThan(0.3)
    })

    it('1000 points in 2 × 2 µm: uncorrected H(200) ≈ −8.5 nm, corrected ≈ 0 ± 1.3 nm', () => {
      const none: number[] = []
      const corrected: number[] = []
      const shape = regionShape(rectangle(0, 0, 2000, 2000))
      for (let seed = 1; seed <= 16; seed++) {
        const p = uniformPoints(1000, 2000, 2000, seed)
        const h = (correction: 'none' | 'translation') => {
          const res = ripley(p.x, p.y, p.count, shape, {
            ...params,
            rMax: 200,
            steps: 4,
            correction,
          })
          return at(res.r, res.H, 200)
        }
        none.push(h('none'))
        corrected.push(h('translation'))
      }
      const mean = (v: number[]) => v.reduce((s, x) => s + x, 0) / v.length
      const sd = (v: number[]) =>
        Math.sqrt(v.reduce((s, x) => s + (x - mean(v)) ** 2, 0) / (v.length - 1))
      expect(mean(none)).toBeGreaterThan(-9.5)
      expect(mean(none)).toBeLessThan(-7.5)
      expect(Math.abs(mean(corrected))).toBeLessThan(0.6)
      expect(sd(corrected)).toBeLessThan(2)
    })

    it('agrees with the brute-force translation estimator on the same points', () => {
      const p = uniformPoints(1500, 3000, 2000, 11)
      const res = ripley(p.x, p.y, p.count, regionShape(rectangle(0, 0, 3000, 2000)), {
        ...params,
        rMax: 400,
        steps: 4,
      })
      for (const r of [100, 200, 300, 400]) {
        const exact = exactK(p.x, p.y, p.count, 3000, 2000, r)
        expect(Math.abs(at(res.r, res.K, r) / exact - 1), `K(${r})`).toBeLessThan(0.02)
      }
    })

    it('stays inside the envelope of 99 simulations, in a rectangle and in an ellipse', () => {
      const box = uniformPoints(3000, 4000, 4000, 21)
      const boxRes = ripley(box.x, box.y, box.count, regionShape(rectangle(0, 0, 4000, 4000)), {
        ...params,
        rMax: 400,
        steps: 20,
        simulations: 99,
      })
      const outside = (res: typeof boxRes) =>
        res.L.filter((l, j) => l < res.envelope!.low[j]! || l > res.envelope!.high[j]!).length
      expect(outside(boxRes)).toBeLessThanOrEqual(1)
      // Points kept inside a rotated ellipse: the window is no rectangle.
      const ellipse = regionShape({
        type: 'Ellipse',
        center: [2000, 2000],
        radii: [1800, 900],
        rotation: 30,
      })
      const all = uniformPoints(6000, 4000, 4000, 22)
      const keep = Array.from({ length: all.count }, (_, i) => i).filter((i) =>
        ellipse.contains(all.x[i]!, all.y[i]!),
      )
      const ex = Float64Array.from(keep, (i) => all.x[i]!)
      const ey = Float64Array.from(keep, (i) => all.y[i]!)
      const ellRes = ripley(ex, ey, keep.length, ellipse, {
        ...params,
        rMax: 300,
        steps: 15,
        simulations: 99,
      })
      expect(outside(ellRes)).toBeLessThanOrEqual(1)
      for (const h of ellRes.H) expect(Math.abs(h)).toBeLessThan(6)
    })
  },
)

describe("Ripley's functions for clustered points", { timeout: 60_000 }, () => {
  it('H(r) > 0 near the cluster radius and L above the CSR envelope', () => {
    const random = new Random(5)
    const points = concat(
      gaussianClusters(spacedCentres(40, 5000, 200, 400, random), 40, 30, random),
      uniformPoints(400, 5000, 5000, 6),
    )
    const res = ripley(points.x, points.y, points.count, regionShape(rectangle(0, 0, 5000, 5000)), {
      ...params,
      rMax: 300,
      steps: 10,
      simulations: 39,
    })
    expect(at(res.r, res.H, 30)).toBeGreaterThan(20)
    for (const j of [0, 1, 2, 3, 4]) expect(res.L[j]!).toBeGreaterThan(res.envelope!.high[j]! + 10)
  })
})

describe('Ripley limits', () => {
  it('refuses rMax beyond half the shorter side and simulation counts past the stated limit', () => {
    const p = uniformPoints(1000, 1000, 1000, 1)
    const shape = regionShape(rectangle(0, 0, 1000, 1000))
    expect(() => ripley(p.x, p.y, p.count, shape, { ...params, rMax: 600 })).toThrow(/at most half/)
    const many = { x: new Float64Array(0), y: new Float64Array(0), count: 3_000_000 }
    expect(() =>
      ripley(many.x, many.y, many.count, shape, { ...params, rMax: 100, simulations: 99 }),
    ).toThrow(MeasurementLimitError)
    expect(() =>
      ripley(many.x, many.y, many.count, shape, { ...params, rMax: 100, simulations: 99 }),
    ).toThrow(/limit of 200,000,000 simulated localizations; use at most 66 simulations/)
  })
})
