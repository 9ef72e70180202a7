import { describe, expect, it } from 'vitest'
import {
  renderHistogram,
  renderValueHistogram,
  type RenderFilter,
  type RenderView,
} from '../../../../server/compute/render'
import type { Localizations } from '../../../../server/compute/localizations.types'
import { randomTable, sum, tableOf } from './render-fixtures'

/** Brute force: each point's pixel by Math.floor, counted in a Map, the filter written out again. */
function bruteForceCounts(locs: Localizations, v: RenderView, filter: RenderFilter = {}) {
  const counts = new Map<number, number>()
  for (let i = 0; i < locs.count; i++) {
    const c = Math.floor((locs.x[i]! - v.xMinNm) / v.pixelNm)
    const r = Math.floor((locs.y[i]! - v.yMinNm) / v.pixelNm)
    if (!(c >= 0 && c < v.width && r >= 0 && r < v.height)) continue
    const f = locs.frame[i]!
    if (filter.frameMin !== undefined && f < filter.frameMin) continue
    if (filter.frameMax !== undefined && f > filter.frameMax) continue
    if (filter.maxUncertaintyNm !== undefined && locs.uncertainty![i]! > filter.maxUncertaintyNm) {
      continue
    }
    if (filter.channel !== undefined && locs.channel![i] !== filter.channel) continue
    counts.set(r * v.width + c, (counts.get(r * v.width + c) ?? 0) + 1)
  }
  return counts
}

function expectEqualCounts(image: Float32Array, expected: Map<number, number>) {
  let nonZero = 0
  for (let p = 0; p < image.length; p++) {
    if (image[p] !== 0) nonZero++
    expect(image[p]).toBe(expected.get(p) ?? 0)
  }
  expect(nonZero).toBe(expected.size)
}

const field: RenderView = { xMinNm: 150, yMinNm: -75, pixelNm: 7.5, width: 90, height: 70 }

describe('histogram render', () => {
  const locs = randomTable(20_000, 21, { x0: 0, x1: 1000, y0: -200, y1: 700 })

  it('equals a brute-force per-point count (points outside the view left out)', () => {
    expectEqualCounts(renderHistogram(locs, field), bruteForceCounts(locs, field))
  })

  it.each<[string, RenderFilter]>([
    ['frame range', { frameMin: 100, frameMax: 399 }],
    ['precision', { maxUncertaintyNm: 12 }],
    ['channel', { channel: 1 }],
    ['all three', { frameMin: 500, maxUncertaintyNm: 20, channel: 0 }],
  ])('filtered by %s equals the brute-force count', (_name, filter) => {
    expectEqualCounts(renderHistogram(locs, field, filter), bruteForceCounts(locs, field, filter))
  })

  it('a large image (counted band by band) equals the brute-force count', () => {
    const big: RenderView = { xMinNm: 0, yMinNm: 0, pixelNm: 1, width: 1500, height: 1100 }
    const many = randomTable(600_000, 22, { x0: -50, x1: 1550, y0: -50, y1: 1150 })
    const image = renderHistogram(many, big, { frameMax: 899 })
    const expected = bruteForceCounts(many, big, { frameMax: 899 })
    let mismatches = 0
    for (let p = 0; p < image.length; p++) if (image[p] !== (expected.get(p) ?? 0)) mismatches++
    expect(mismatches).toBe(0)
    expect(sum(image)).toBe(sum([...expected.values()]))
  })

  it('row 0 holds the smallest y and pixels are half-open', () => {
    const v: RenderView = { xMinNm: 0, yMinNm: 0, pixelNm: 10, width: 3, height: 2 }
    const image = renderHistogram(
      tableOf({ x: [0, 29.99, 30, 5, 15], y: [0, 0, 0, 15, 19.999] }),
      v,
    )
    expect(Array.from(image)).toEqual([1, 0, 1, 1, 1, 0])
  })

  it('bad rows and bad views give counts without throwing', () => {
    const bad = tableOf({ x: [NaN, 5, Infinity], y: [5, NaN, 5] })
    const v: RenderView = { xMinNm: 0, yMinNm: 0, pixelNm: 10, width: 2, height: 2 }
    expect(sum(renderHistogram(bad, v))).toBe(0)
    expect(renderHistogram(bad, { ...v, pixelNm: NaN })).toHaveLength(0)
    // A table without a channel column is channel 0 throughout.
    expect(sum(renderHistogram(tableOf({ x: [5], y: [5] }), v, { channel: 0 }))).toBe(1)
    expect(sum(renderHistogram(tableOf({ x: [5], y: [5] }), v, { channel: 1 }))).toBe(0)
    // A precision filter on a table without uncertainties draws nothing rather than everything.
    expect(sum(renderHistogram(tableOf({ x: [5], y: [5] }), v, { maxUncertaintyNm: 10 }))).toBe(0)
  })

  it.each([
    ['a small', field],
    ['a large (banded)', { xMinNm: 0, yMinNm: -75, pixelNm: 0.75, width: 1300, height: 1100 }],
  ])('the value histogram of %s image holds each pixel’s mean value (brute force)', (_n, v) => {
    const z = new Float64Array(locs.count)
    for (let i = 0; i < locs.count; i++) z[i] = (i % 97) * 3 - 100
    z[5] = NaN // left out of counts and means alike
    const { density, mean } = renderValueHistogram(locs, v, z)
    const sums = new Map<number, number>()
    const counts = new Map<number, number>()
    for (let i = 0; i < locs.count; i++) {
      const c = Math.floor((locs.x[i]! - v.xMinNm) / v.pixelNm)
      const r = Math.floor((locs.y[i]! - v.yMinNm) / v.pixelNm)
      if (c < 0 || c >= v.width || r < 0 || r >= v.height || Number.isNaN(z[i])) continue
      sums.set(r * v.width + c, (sums.get(r * v.width + c) ?? 0) + z[i]!)
      counts.set(r * v.width + c, (counts.get(r * v.width + c) ?? 0) + 1)
    }
    let mismatches = 0
    for (let p = 0; p < density.length; p++) {
      const n = counts.get(p)
      const ok =
        n === undefined
          ? density[p] === 0 && Number.isNaN(mean[p])
          : density[p] === n && Math.abs(mean[p]! - sums.get(p)! / n) < 1e-3
      if (!ok) mismatches++
    }
    expect(mismatches).toBe(0)
  })
})
