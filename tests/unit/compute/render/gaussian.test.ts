import { describe, expect, it } from 'vitest'
import {
  erf,
  renderGaussian,
  renderGaussianDetailed,
  renderGaussianValue,
  type RenderView,
} from '../../../../server/compute/render'
import { randomTable, sum, tableOf } from './render-fixtures'

const view = (pixelNm: number, size: number): RenderView => ({
  xMinNm: 0,
  yMinNm: 0,
  pixelNm,
  width: size,
  height: size,
})

/** Pixel integral of a 2D Gaussian by Simpson's rule on a fine grid: no erf involved. */
function simpsonPixel(cx: number, cy: number, s: number, px: number, py: number): number {
  const steps = 40
  const h = 1 / steps
  const axis = (c: number, p: number) => {
    let total = 0
    for (let k = 0; k <= steps; k++) {
      const t = p + k * h
      const weight = k === 0 || k === steps ? 1 : k % 2 === 1 ? 4 : 2
      total += weight * Math.exp(-((t - c) ** 2) / (2 * s * s))
    }
    return (total * h) / 3 / (s * Math.sqrt(2 * Math.PI))
  }
  return axis(cx, px) * axis(cy, py)
}

describe('Gaussian render', () => {
  it('one localization, σ = 10 nm on 1 nm pixels: peak ≈ 1/(2π·100), total 1 (DOMAIN §1.11 [S])', () => {
    const locs = tableOf({ x: [100.5], y: [100.5] })
    // Truncated far out (6σ), so the image is the untruncated Gaussian the check values describe.
    const image = renderGaussian(locs, view(1, 201), { sigmaNm: 10, truncateSigmas: 6 })
    // The pixel integral is a little below the point density 0.0015915 (0.0015902 by erf).
    expect(image[100 * 201 + 100]).toBeCloseTo(0.0015915, 5)
    expect(Math.max(...image)).toBe(image[100 * 201 + 100])
    expect(sum(image)).toBeCloseTo(1, 5)
  })

  it('on 5 nm pixels the centred pixel holds erf(5/(2√2·10))² = 0.03897 (DOMAIN §1.11 [S])', () => {
    const locs = tableOf({ x: [102.5], y: [102.5] })
    const image = renderGaussian(locs, view(5, 41), { sigmaNm: 10, truncateSigmas: 6 })
    expect(image[20 * 41 + 20]).toBeCloseTo(0.03897, 5)
    expect(sum(image)).toBeCloseTo(1, 5)
  })

  it('the default 3σ cut keeps the total at 1 and moves the centre by the renormalization only', () => {
    const locs = tableOf({ x: [102.5], y: [102.5] })
    const image = renderGaussian(locs, view(5, 41), { sigmaNm: 10 })
    expect(sum(image)).toBeCloseTo(1, 5)
    // DOMAIN §1.11 value 0.03897 to more digits (Python math.erf); the window ends at pixel edges
    // 6.5 px = 3.25σ from the centre and holds erf(3.25/√2)² of the mass.
    const windowMass = erf(3.25 / Math.SQRT2) ** 2
    expect(image[20 * 41 + 20]).toBeCloseTo(0.038971755 / windowMass, 6)
  })

  it('matches a Simpson-rule integral of the Gaussian over every pixel (independent quadrature)', () => {
    const locs = tableOf({ x: [61.3], y: [47.9], uncertainty: [17] })
    const image = renderGaussian(locs, view(10, 12), { truncateSigmas: 6 })
    for (let r = 0; r < 12; r++) {
      for (let c = 0; c < 12; c++) {
        const expected = simpsonPixel(6.13, 4.79, 1.7, c, r)
        expect(Math.abs(image[r * 12 + c]! - expected)).toBeLessThan(2e-6)
      }
    }
  })

  it('many localizations well inside the field sum to their count (DOMAIN §1.11 [P])', () => {
    // Uncertainties 3–30 nm, so kernels (±4σ ≤ 120 nm) stay inside a 200 nm margin.
    const locs = randomTable(3000, 11, { x0: 200, x1: 4800, y0: 200, y1: 4800 })
    const result = renderGaussianDetailed(locs, view(10, 500))
    expect(result.inside).toBe(3000)
    expect(result.weightLeavingView).toBeLessThan(1e-9)
    expect(sum(result.image)).toBeCloseTo(3000, 2)
  })

  it('at the edges, the image holds each kernel’s share inside the view (erf of the clipped box)', () => {
    const locs = randomTable(2000, 12, { x0: -300, x1: 1300, y0: -300, y1: 1300 })
    const v: RenderView = { xMinNm: 0, yMinNm: 0, pixelNm: 10, width: 100, height: 100 }
    const result = renderGaussianDetailed(locs, v, { truncateSigmas: 6, minSigmaPx: 0 })
    let expected = 0
    const share = (c: number, s: number, lo: number, hi: number) =>
      0.5 * (erf((hi - c) / (s * Math.SQRT2)) - erf((lo - c) / (s * Math.SQRT2)))
    for (let i = 0; i < locs.count; i++) {
      const s = locs.uncertainty![i]!
      expected += share(locs.x[i]!, s, 0, 1000) * share(locs.y[i]!, s, 0, 1000)
    }
    expect(sum(result.image)).toBeCloseTo(expected, 2)
    const accounted = result.inside - result.weightLeavingView + result.weightEnteringView
    expect(sum(result.image)).toBeCloseTo(accounted, 2)
  })

  it('four quarter views put together equal the whole view (seamless tiles)', () => {
    const locs = randomTable(1500, 13, { x0: 0, x1: 1280, y0: 0, y1: 1280 })
    const whole = renderGaussian(locs, view(10, 128))
    for (const [qx, qy] of [
      [0, 0],
      [1, 0],
      [0, 1],
      [1, 1],
    ] as const) {
      const part = renderGaussian(locs, {
        xMinNm: qx * 640,
        yMinNm: qy * 640,
        pixelNm: 10,
        width: 64,
        height: 64,
      })
      for (let r = 0; r < 64; r++) {
        for (let c = 0; c < 64; c++) {
          const w = whole[(qy * 64 + r) * 128 + qx * 64 + c]!
          expect(part[r * 64 + c]).toBeCloseTo(w, 5)
        }
      }
    }
  })

  it('caps huge σ, floors tiny σ, and skips NaN positions without throwing', () => {
    const locs = tableOf({ x: [50, NaN, 20], y: [50, 10, 20], uncertainty: [1e6, 5, 1e-6] })
    const result = renderGaussianDetailed(locs, view(1, 100), { maxSigmaPx: 8, minSigmaPx: 0.5 })
    expect(result.sigmaClamped).toBe(2)
    expect(result.inside).toBe(2)
    expect(sum(result.image)).toBeCloseTo(2, 4)
    expect(renderGaussian(tableOf({ x: [], y: [] }), view(1, 4))).toHaveLength(16)
    expect(renderGaussian(locs, { ...view(1, 4), pixelNm: 0 })).toHaveLength(0)
  })

  it('filters and weighted means follow the rows drawn', () => {
    const locs = tableOf({ x: [50, 50], y: [50, 50], z: [100, 300], channel: [0, 1] })
    const both = renderGaussianValue(locs, view(10, 10), locs.z!, { sigmaNm: 10 })
    expect(both.mean[5 * 10 + 5]).toBeCloseTo(200, 3)
    const first = renderGaussianValue(locs, view(10, 10), locs.z!, {
      sigmaNm: 10,
      filter: { channel: 0 },
    })
    expect(first.mean[5 * 10 + 5]).toBeCloseTo(100, 3)
    expect(sum(first.density)).toBeCloseTo(1, 5)
  })
})
