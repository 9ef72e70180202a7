import { describe, expect, it } from 'vitest'
import {
  regionBounds,
  regionGeometryProblem,
  ringSelfIntersects,
} from '@shared/domain/region-geometry'
import type { PositionNm } from '@shared/schemas/region.schema'
import { previewTileGrid, toMap } from '@/utils/previewGrid'
import { geometryOfDrawing, mapOutline } from '@/utils/regionGeometry'
import { previewInfo } from '../../fixtures/quality-report'

describe('regions between the viewer and sample nm', () => {
  // The fixture's pyramid (by hand, see preview-grid.test.ts): tile (0, 0) starts at
  // (1000, 2000) nm; at z = 3 a tile spans 1024 nm, so tile [3, 3, 2] covers x 4072…5096 nm and
  // y 4048…5072 nm (rows grow downward in sample y).
  it('turns a rectangle drawn over a tile into that tile’s nm corners', () => {
    const [minX, minY, maxX, maxY] = previewTileGrid(previewInfo).getTileCoordExtent([3, 3, 2]) as [
      number,
      number,
      number,
      number,
    ]
    const ring = [
      [minX, minY],
      [maxX, minY],
      [maxX, maxY],
      [minX, maxY],
      [minX, minY],
    ]
    const g = geometryOfDrawing({ shape: 'rectangle', ring })
    expect(g.type).toBe('Polygon')
    const corners = g.type === 'Polygon' ? g.coordinates[0]! : []
    expect(corners).toHaveLength(5)
    expect(Math.min(...corners.map((p) => p[0]))).toBe(4072)
    expect(Math.max(...corners.map((p) => p[0]))).toBe(5096)
    expect(Math.min(...corners.map((p) => p[1]))).toBe(4048)
    expect(Math.max(...corners.map((p) => p[1]))).toBe(5072)
  })

  it('closes an open polygon ring and draws it back where it was drawn', () => {
    const drawn = [
      [1200, -2300],
      [1400, -2300],
      [1300, -2500],
    ]
    const g = geometryOfDrawing({ shape: 'polygon', ring: drawn })
    expect(g).toEqual({
      type: 'Polygon',
      coordinates: [
        [
          [1200, 2300],
          [1400, 2300],
          [1300, 2500],
          [1200, 2300],
        ],
      ],
    })
    const outline = mapOutline(g)
    expect(outline.kind === 'Polygon' && outline.ring.slice(0, 3)).toEqual(drawn)
  })

  it('keeps a point, a line with its width and an ellipse in nm', () => {
    expect(geometryOfDrawing({ shape: 'point', at: [1500, -2600] })).toEqual({
      type: 'Point',
      coordinates: [1500, 2600],
    })
    expect(
      geometryOfDrawing({
        shape: 'line',
        path: [
          [1000, -2000],
          [2000, -3000],
        ],
        widthNm: 80,
      }),
    ).toEqual({
      type: 'LineString',
      coordinates: [
        [1000, 2000],
        [2000, 3000],
      ],
      width: 80,
    })
    const ellipse = geometryOfDrawing({
      shape: 'ellipse',
      centre: [1500, -2500],
      radii: [-100, 50],
    })
    expect(ellipse).toEqual({
      type: 'Ellipse',
      center: [1500, 2500],
      radii: [100, 50],
      rotation: 0,
    })
    // The outline's first vertex is the end of the first semi-axis, +x from the centre.
    const outline = mapOutline(ellipse)
    expect(outline.kind === 'Polygon' && outline.ring[0]).toEqual(toMap(1600, 2500))
  })
})

describe('region outlines in sample nm', () => {
  const square: PositionNm[] = [
    [0, 0],
    [10, 0],
    [10, 10],
    [0, 10],
    [0, 0],
  ]
  it('tells a crossing outline from a simple one', () => {
    expect(ringSelfIntersects(square)).toBe(false)
    expect(
      ringSelfIntersects([
        [0, 0],
        [10, 10],
        [10, 0],
        [0, 10],
        [0, 0],
      ]),
    ).toBe(true)
    // An edge that runs back over its neighbour (a spike) touches itself.
    expect(
      ringSelfIntersects([
        [0, 0],
        [10, 0],
        [5, 0],
        [5, 5],
        [0, 0],
      ]),
    ).toBe(true)
    // A vertex touching another edge.
    expect(
      ringSelfIntersects([
        [0, 0],
        [10, 0],
        [10, 10],
        [5, 0],
        [0, 10],
        [0, 0],
      ]),
    ).toBe(true)
  })

  it('names what is wrong in words', () => {
    expect(regionGeometryProblem({ type: 'Polygon', coordinates: [square] })).toBeNull()
    expect(
      regionGeometryProblem({
        type: 'Polygon',
        coordinates: [
          [
            [0, 0],
            [5, 0],
            [10, 0],
            [0, 0],
          ],
        ],
      }),
    ).toMatch(/crosses itself|no area/)
    expect(
      regionGeometryProblem({
        type: 'LineString',
        coordinates: [
          [3, 3],
          [3, 3],
        ],
        width: 5,
      }),
    ).toMatch(/no length/)
  })

  it('bounds a rotated ellipse and a line’s band exactly', () => {
    const b = regionBounds({ type: 'Ellipse', center: [100, 200], radii: [50, 10], rotation: 90 })
    expect(b.xMin).toBeCloseTo(90, 9)
    expect(b.xMax).toBeCloseTo(110, 9)
    expect(b.yMin).toBeCloseTo(150, 9)
    expect(b.yMax).toBeCloseTo(250, 9)
    expect(
      regionBounds({
        type: 'LineString',
        coordinates: [
          [0, 0],
          [100, 0],
        ],
        width: 30,
      }),
    ).toEqual({ xMin: -15, yMin: -15, xMax: 115, yMax: 15 })
  })
})
