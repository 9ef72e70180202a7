import type { RegionGeometry } from '@shared/schemas/region.schema'

/** A region as it travels in an exchange file: what another program can draw and name. */
export interface ExchangeRegion {
  label: string
  /** #rrggbb */
  colour?: string
  geometry: RegionGeometry
}

/** What an import made of a file: the regions, and why each element left out was left out. */
export interface ExchangeImport {
  regions: ExchangeRegion[]
  skipped: { item: string; reason: string }[]
  /** How the file's coordinates were read (units, scale), in words. */
  coordinates: string
}

/** Stated in every exported file: the frame the coordinates are in. */
export const COORDINATE_CONVENTION =
  'Sample nanometres in the localization table’s own frame: x to the right, y downwards (as the preview draws it), origin at the table’s (0, 0).'

/** Bound on the regions one file may bring in. */
export const MAX_IMPORTED_REGIONS = 5_000

/** Points of a polygon standing for an ellipse where a format has no ellipse. */
export function ellipseOutline(
  center: [number, number],
  radii: [number, number],
  rotationDeg: number,
  vertices = 72,
): [number, number][] {
  const a = (rotationDeg * Math.PI) / 180
  const ring: [number, number][] = []
  for (let k = 0; k < vertices; k++) {
    const t = (2 * Math.PI * k) / vertices
    const u = radii[0] * Math.cos(t)
    const v = radii[1] * Math.sin(t)
    ring.push([
      center[0] + u * Math.cos(a) - v * Math.sin(a),
      center[1] + u * Math.sin(a) + v * Math.cos(a),
    ])
  }
  ring.push(ring[0]!)
  return ring
}
