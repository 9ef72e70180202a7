// @vitest-environment node
import { describe, expect, it } from 'vitest'
import { applyEdgeTaper, taperWeights } from '../../../../server/compute/frc/edge-taper'
import { chooseGrid, measureExtent } from '../../../../server/compute/frc/render-grid'
import { renderHalves } from '../../../../server/compute/frc/render-halves'

describe('render grid and histogram halves', () => {
  const locs = {
    count: 5,
    x: Float64Array.from([0, 12, 12, 318, NaN]),
    y: Float64Array.from([0, 7, 7, 200, 3]),
    frame: Float64Array.from([0, 10, 60, 99, 50]),
  }

  // Source: by hand — box 318 × 200 nm at 5 nm is 64 pixels wide: the smallest grid, 64,
  // centred on the box (159, 100), origin 159 − 160 = −1 and 100 − 160 = −60.
  it('centres a padded power-of-two grid on the occupied box', () => {
    const extent = measureExtent(locs)
    expect(extent.finite).toBe(4)
    const grid = chooseGrid(extent, 5, 4096)
    expect(grid).toMatchObject({ size: 64, originXNm: -1, originYNm: -60 })
    expect(chooseGrid(extent, 5, 32).field).toBe('occupied bounding box')
  })

  // Source: by hand — counts per 5 nm bin; frames 0–49 are block 0 (half A), 50–99 block 1 (B).
  it('counts each localization in its bin and in its block’s half', () => {
    const grid = {
      size: 64,
      pixelNm: 5,
      originXNm: -1,
      originYNm: -60,
      field: 'occupied bounding box' as const,
    }
    const re = new Float32Array(64 * 64)
    const im = new Float32Array(64 * 64)
    const halves = { firstFrame: 0, frameSpan: 100, halfOfBlock: Uint8Array.from([0, 1]) }
    const counts = renderHalves(locs, grid, halves, re, im)
    expect(counts).toEqual({ a: 2, b: 2 })
    expect(re[12 * 64 + 0]).toBe(1) // (0, 0): column ⌊1/5⌋ = 0, row ⌊60/5⌋ = 12
    expect(re[13 * 64 + 2]).toBe(1) // (12, 7), frame 10: column 2, row ⌊67/5⌋ = 13
    expect(im[13 * 64 + 2]).toBe(1) // same place, frame 60
    expect(im[52 * 64 + 63]).toBe(1) // (318, 200): column ⌊319/5⌋ = 63, row ⌊260/5⌋ = 52
  })
})

describe('cosine edge taper', () => {
  // Source: DOMAIN.md §6 — cosine taper over the outer 1/8 of each side.
  it('rises over the outer eighth and is 1 inside', () => {
    const w = taperWeights(64)
    expect(w[0]).toBeCloseTo(Math.sin(Math.PI / 32) ** 2, 12)
    expect(w[7]).toBeCloseTo(Math.sin((Math.PI / 2) * (7.5 / 8)) ** 2, 12)
    expect(w[8]).toBe(1)
    expect(w[55]).toBe(1)
    expect(w[56]).toBeCloseTo(w[7]!, 12)
    expect(w[63]).toBeCloseTo(w[0]!, 12)
  })

  // Source: brute force — every pixel multiplied by w(x)·w(y); Σ count·w² summed directly.
  it('multiplies every pixel by w(x)·w(y) and returns Σ count·w²', () => {
    const size = 32
    const re = Float32Array.from({ length: size * size }, (_, i) => i % 3)
    const im = Float32Array.from({ length: size * size }, (_, i) => i % 5)
    const [a, b] = [re.slice(), im.slice()]
    const w = taperWeights(size)
    const total = { a: a.reduce((s, v) => s + v, 0), b: b.reduce((s, v) => s + v, 0) }
    const weighted = applyEdgeTaper(re, im, size, total)
    let [expectedA, expectedB] = [0, 0]
    for (let row = 0; row < size; row++) {
      for (let column = 0; column < size; column++) {
        const i = row * size + column
        const wi = w[row]! * w[column]!
        expect(re[i]).toBeCloseTo(a[i]! * wi, 5)
        expect(im[i]).toBeCloseTo(b[i]! * wi, 5)
        expectedA += a[i]! * wi * wi
        expectedB += b[i]! * wi * wi
      }
    }
    expect(weighted.a).toBeCloseTo(expectedA, 6)
    expect(weighted.b).toBeCloseTo(expectedB, 6)
  })
})
