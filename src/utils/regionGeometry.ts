import { ellipseRing } from '@shared/domain/region-geometry'
import type { PositionNm, RegionGeometry, RegionShape } from '@shared/schemas/region.schema'
import { fromMap, toMap, type MapCoordinate } from './previewGrid'

/**
 * Converts drawn shapes to stored ones and back. Drawing happens in preview coordinates
 * (nanometres, vertical axis flipped, see previewGrid.ts); storage keeps nanometres of the
 * table, so each conversion uses the toMap/fromMap pair that places the tiles, and a shape
 * stays where it was drawn at every zoom and rendering.
 */

const nmOf = (c: readonly number[]): PositionNm => {
  const { xNm, yNm } = fromMap(c)
  return [xNm, yNm]
}

/** What a finished drawing gives, in map coordinates. */
export type Drawing =
  | { shape: 'rectangle' | 'polygon'; ring: readonly (readonly number[])[] }
  | { shape: 'point'; at: readonly number[] }
  | { shape: 'line'; path: readonly (readonly number[])[]; widthNm: number }
  | { shape: 'ellipse'; centre: readonly number[]; radii: readonly [number, number] }

/** A drawing on the map as the region geometry the API stores (sample nm). */
export function geometryOfDrawing(d: Drawing): RegionGeometry {
  switch (d.shape) {
    case 'rectangle':
    case 'polygon': {
      const ring = d.ring.map(nmOf)
      const first = ring[0]
      const last = ring[ring.length - 1]
      if (first && last && (first[0] !== last[0] || first[1] !== last[1])) ring.push(first)
      return { type: 'Polygon', coordinates: [ring] }
    }
    case 'point':
      return { type: 'Point', coordinates: nmOf(d.at) }
    case 'line':
      return { type: 'LineString', coordinates: d.path.map(nmOf), width: d.widthNm }
    case 'ellipse':
      // Map units are nm, so the radii carry over; an axis-aligned ellipse has no rotation.
      return {
        type: 'Ellipse',
        center: nmOf(d.centre),
        radii: [Math.abs(d.radii[0]), Math.abs(d.radii[1])],
        rotation: 0,
      }
  }
}

/** The outline to draw a stored region with, in map coordinates. */
export function mapOutline(g: RegionGeometry):
  | { kind: 'Polygon'; ring: MapCoordinate[] }
  | { kind: 'Point'; at: MapCoordinate }
  | {
      kind: 'LineString'
      path: MapCoordinate[]
    } {
  switch (g.type) {
    case 'Polygon':
      return { kind: 'Polygon', ring: (g.coordinates[0] ?? []).map(([x, y]) => toMap(x, y)) }
    case 'Ellipse':
      return { kind: 'Polygon', ring: ellipseRing(g).map(([x, y]) => toMap(x, y)) }
    case 'Point':
      return { kind: 'Point', at: toMap(g.coordinates[0], g.coordinates[1]) }
    case 'LineString':
      return { kind: 'LineString', path: g.coordinates.map(([x, y]) => toMap(x, y)) }
  }
}

export const SHAPE_LABELS: Record<RegionShape, string> = {
  rectangle: 'Rectangle',
  polygon: 'Polygon',
  ellipse: 'Ellipse',
  point: 'Point',
  line: 'Line',
}

const nmFmt = new Intl.NumberFormat(undefined, { maximumFractionDigits: 0 })

/** A short description of a region's size, for the list. */
export function regionSummary(g: RegionGeometry): string {
  switch (g.type) {
    case 'Point':
      return `at ${nmFmt.format(g.coordinates[0])}, ${nmFmt.format(g.coordinates[1])} nm`
    case 'LineString': {
      let length = 0
      for (let i = 1; i < g.coordinates.length; i++) {
        const [x0, y0] = g.coordinates[i - 1]!
        const [x1, y1] = g.coordinates[i]!
        length += Math.hypot(x1 - x0, y1 - y0)
      }
      return `${nmFmt.format(length)} nm long, ${nmFmt.format(g.width)} nm wide`
    }
    case 'Ellipse':
      return `${nmFmt.format(2 * g.radii[0])} × ${nmFmt.format(2 * g.radii[1])} nm`
    case 'Polygon': {
      const ring = g.coordinates[0] ?? []
      const xs = ring.map((p) => p[0])
      const ys = ring.map((p) => p[1])
      return `${nmFmt.format(Math.max(...xs) - Math.min(...xs))} × ${nmFmt.format(Math.max(...ys) - Math.min(...ys))} nm box`
    }
  }
}
