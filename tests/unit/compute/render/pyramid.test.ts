import { describe, expect, it } from 'vitest'
import { pyramidFor, tileView, type RenderView } from '../../../../server/compute/render'

// Expectations follow from the geometry asked for (level 0 one tile over the field, pixel halving
// per level, deepest pixel about 1 nm), worked out by hand; no outside source.
const bounds = { xMin: -1200, xMax: 38_800, yMin: 500, yMax: 25_500 } // 40 × 25 µm

const right = (v: RenderView) => v.xMinNm + v.width * v.pixelNm
const bottom = (v: RenderView) => v.yMinNm + v.height * v.pixelNm

describe('tile pyramid', () => {
  const pyramid = pyramidFor(bounds)

  it('level 0 is one tile covering the bounds', () => {
    const top = tileView(pyramid, 0, 0, 0)!
    expect(top.xMinNm).toBe(bounds.xMin)
    expect(top.yMinNm).toBe(bounds.yMin)
    expect(right(top)).toBeGreaterThanOrEqual(bounds.xMax)
    expect(bottom(top)).toBeGreaterThanOrEqual(bounds.yMax)
    expect(tileView(pyramid, 0, 1, 0)).toBeNull()
    // 40 000 nm / 256 px = 156 nm → the next power of two of 1 nm is 256 nm, so 9 levels.
    expect(pyramid.resolutionsNm[0]).toBe(256)
    expect(pyramid.levels).toBe(9)
  })

  it('pixels halve per level and the deepest is ≤ 1 nm (here exactly 1 nm)', () => {
    for (let z = 1; z < pyramid.levels; z++) {
      expect(pyramid.resolutionsNm[z]).toBe(pyramid.resolutionsNm[z - 1]! / 2)
    }
    expect(pyramid.resolutionsNm[pyramid.levels - 1]).toBe(1)
    expect(tileView(pyramid, pyramid.levels, 0, 0)).toBeNull()
  })

  it('the four children of a tile cover exactly their parent; missing ones lie beyond the field', () => {
    for (let z = 0; z < 4; z++) {
      const { columns, rows } = pyramid.tileCounts[z]!
      for (let x = 0; x < columns; x++) {
        for (let y = 0; y < rows; y++) {
          const parent = tileView(pyramid, z, x, y)!
          for (const [dx, dy] of [
            [0, 0],
            [1, 0],
            [0, 1],
            [1, 1],
          ] as const) {
            const child = tileView(pyramid, z + 1, 2 * x + dx, 2 * y + dy)
            const xMin = parent.xMinNm + (dx * parent.width * parent.pixelNm) / 2
            const yMin = parent.yMinNm + (dy * parent.height * parent.pixelNm) / 2
            if (child === null) {
              expect(xMin >= bounds.xMax || yMin >= bounds.yMax).toBe(true)
              continue
            }
            expect(child).toEqual({
              ...parent,
              xMinNm: xMin,
              yMinNm: yMin,
              pixelNm: parent.pixelNm / 2,
            })
          }
        }
      }
    }
  })

  it('each level’s tiles cover the bounds and no more than one tile beyond', () => {
    for (let z = 0; z < pyramid.levels; z++) {
      const { columns, rows } = pyramid.tileCounts[z]!
      const last = tileView(pyramid, z, columns - 1, rows - 1)!
      expect(right(last)).toBeGreaterThanOrEqual(bounds.xMax)
      expect(bottom(last)).toBeGreaterThanOrEqual(bounds.yMax)
      expect(last.xMinNm).toBeLessThan(bounds.xMax)
      expect(last.yMinNm).toBeLessThan(bounds.yMax)
      expect(tileView(pyramid, z, columns, 0)).toBeNull()
    }
  })

  it('other tile sizes and finest pixels, and unusable input, without throwing', () => {
    const small = pyramidFor({ xMin: 0, xMax: 100, yMin: 0, yMax: 100 }, 512, 0.5)
    expect(small.levels).toBe(1)
    expect(small.resolutionsNm).toEqual([0.5])
    const bad = pyramidFor({ xMin: NaN, xMax: 1, yMin: 0, yMax: 1 })
    expect(bad.reason).toMatch(/not finite/)
    expect(tileView(bad, 0, 0, 0)).not.toBeNull()
    expect(tileView(pyramid, 1.5, 0, 0)).toBeNull()
    expect(tileView(pyramid, 1, -1, 0)).toBeNull()
  })
})
