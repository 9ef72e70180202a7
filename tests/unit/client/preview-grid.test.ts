import { describe, expect, it } from 'vitest'
import { pyramidFor, tileView } from '@server/compute/render/pyramid'
import { tileUrl, type PreviewInfo } from '@/api/quality'
import {
  fromMap,
  previewProjection,
  previewTileGrid,
  scaleBar,
  tileAt,
  toMap,
  viewLimits,
} from '@/utils/previewGrid'
import { defaultChoices, tileQueryOf } from '@/utils/previewOptions'
import { previewInfo } from '../../fixtures/quality-report'

/** The PreviewInfo the server describes for a pyramid of its own making. */
function infoFrom(pyramid: ReturnType<typeof pyramidFor>): PreviewInfo {
  return {
    ...previewInfo,
    ...{ tileSize: pyramid.tileSize, levels: pyramid.levels, originNm: pyramid.originNm },
    ...{ extentNm: pyramid.extentNm, resolutionsNm: pyramid.resolutionsNm },
    boundsNm: pyramid.boundsNm,
  }
}

describe('the viewer’s tile grid in sample nm', () => {
  const grid = previewTileGrid(previewInfo)

  // By hand from the schema (tile (0, 0) at originNm, y growing downward): x 1000…6000 nm and
  // y 2000…4000 nm make a 5000 nm field, levels of 32…1 nm pixels; at z = 3 a tile spans
  // 256 × 4 = 1024 nm, so (4082, 4053) lies in column ⌊3082/1024⌋ = 3, row ⌊2053/1024⌋ = 2.
  it('puts a known sample point in the tile the server draws it in', () => {
    expect(tileAt(grid, 3, 4082, 4053)).toEqual([3, 3, 2])
    expect(tileAt(grid, 0, 1000, 2000)).toEqual([0, 0, 0])
    expect(tileAt(grid, 5, 1000 + 256 * 7 + 1, 2000 + 256 * 2 + 1)).toEqual([5, 7, 2])
  })

  it('grows the tile row with sample y, with the smallest y at the top of a tile', () => {
    expect(tileAt(grid, 3, 1500, 2100)[2]).toBe(0)
    expect(tileAt(grid, 3, 1500, 3100)[2]).toBe(1)
    const [minX, minY, maxX, maxY] = grid.getTileCoordExtent([3, 3, 2])
    const top = fromMap([minX ?? 0, maxY ?? 0])
    const bottom = fromMap([maxX ?? 0, minY ?? 0])
    expect(top).toEqual({ xNm: 1000 + 3 * 1024, yNm: 2000 + 2 * 1024 })
    expect(bottom).toEqual({ xNm: 1000 + 4 * 1024, yNm: 2000 + 3 * 1024 })
  })

  it('asks only for the tiles that meet the bounds, as many as the server has', () => {
    // z = 5 (1 nm pixels, 256 nm tiles): ⌈5000/256⌉ = 20 columns, ⌈2000/256⌉ = 8 rows.
    const range = grid.getFullTileRange(5)
    expect([range?.minX, range?.maxX, range?.minY, range?.maxY]).toEqual([0, 19, 0, 7])
  })

  // Independent check: the server's own pyramid geometry (tileView) for an odd field.
  it('agrees with the server’s pyramid for every tile of every level', () => {
    const pyramid = pyramidFor({ xMin: -730.5, xMax: 2911, yMin: 12_004, yMax: 13_377.25 })
    const info = infoFrom(pyramid)
    const ours = previewTileGrid(info)
    for (let z = 0; z < pyramid.levels; z++) {
      const counts = pyramid.tileCounts[z]!
      const range = ours.getFullTileRange(z)
      expect([range?.maxX, range?.maxY]).toEqual([counts.columns - 1, counts.rows - 1])
      for (let x = 0; x < counts.columns; x += Math.max(1, counts.columns >> 2)) {
        for (let y = 0; y < counts.rows; y += Math.max(1, counts.rows >> 2)) {
          const v = tileView(pyramid, z, x, y)!
          const inside = [v.xMinNm + v.pixelNm * 0.5, v.yMinNm + v.pixelNm * 0.5] as const
          expect(tileAt(ours, z, inside[0], inside[1])).toEqual([z, x, y])
        }
      }
    }
  })

  it('maps y to −y and back, in a projection of nm', () => {
    expect(toMap(12, 34)).toEqual([12, -34])
    expect(fromMap(toMap(12, 34))).toEqual({ xNm: 12, yNm: 34 })
    const projection = previewProjection(previewInfo)
    expect(projection.getCode()).toBe('stipple-nm')
    expect(projection.getMetersPerUnit()).toBe(1e-9)
    expect(projection.getExtent()).toEqual([1000, -(2000 + 8192), 1000 + 8192, -2000])
  })

  it('zooms from beyond the whole field to about 1 nm per screen pixel', () => {
    expect(viewLimits(previewInfo)).toEqual({ maxResolution: 64, minResolution: 1 })
  })
})

describe('the scale bar', () => {
  // Round lengths 1, 2 or 5 × 10ⁿ (common practice): at 10 nm per pixel 120 px span 1200 nm →
  // a 1 µm bar, 100 px wide; at 0.5 nm per pixel 60 nm → 50 nm, 100 px.
  it.each([
    [10, { lengthNm: 1000, widthPx: 100, label: '1 µm' }],
    [0.5, { lengthNm: 50, widthPx: 100, label: '50 nm' }],
    [32, { lengthNm: 2000, widthPx: 62.5, label: '2 µm' }],
    [3, { lengthNm: 200, widthPx: 200 / 3, label: '200 nm' }],
  ])('at %s nm per pixel', (nmPerPixel, bar) => expect(scaleBar(nmPerPixel)).toEqual(bar))

  it('has none without a usable resolution', () => {
    expect(scaleBar(0)).toBeNull()
    expect(scaleBar(Number.NaN)).toBeNull()
  })
})

describe('tile queries from the viewer’s choices', () => {
  it('sends only what changes the image, in a stable order', () => {
    const query = tileQueryOf(defaultChoices(), previewInfo)
    expect(query).toEqual({ method: 'histogram', colourBy: 'density', colormap: 'inferno' })
    expect(tileUrl('STPL-000001', 8, 3, 3, 2, query)).toBe(
      '/api/datasets/STPL-000001/files/8/tiles/3/3/2.png?colormap=inferno&colourBy=density&method=histogram',
    )
  })

  it('narrows frames, precision and channel, and leaves the colormap out for two channels', () => {
    const choices = {
      ...defaultChoices(),
      ...{ brightnessStep: 1, frames: [100, 19_999] as [number, number] },
      ...{ maxUncertaintyNm: 15, channel: 1, method: 'gaussian' as const },
    }
    expect(tileQueryOf(choices, previewInfo)).toEqual({
      ...{ method: 'gaussian', colourBy: 'density', colormap: 'inferno', brightness: 2 },
      ...{ frameMin: 100, maxUncertaintyNm: 15, channel: 1 },
    })
    const overlaid = tileQueryOf({ ...choices, colourBy: 'channels' }, previewInfo)
    expect(overlaid.colormap).toBeUndefined()
    expect(overlaid.channel).toBeUndefined()
    const noColumn = tileQueryOf(choices, { ...previewInfo, hasUncertainty: false })
    expect(noColumn.maxUncertaintyNm).toBeUndefined()
  })

  // The server's schema takes whole frames only (frameMin, frameMax are integers).
  it('asks for whole frames, keeping a partly chosen frame', () => {
    const query = tileQueryOf({ ...defaultChoices(), frames: [1999.9, 18_000.2] }, previewInfo)
    expect([query.frameMin, query.frameMax]).toEqual([1999, 18_001])
  })
})
