import type { PositionNm, RegionGeometry } from '../schemas/region.schema'

/**
 * Plain geometry of regions of interest in sample nm: bounding boxes, the polygon rules the
 * API enforces, and the outline an ellipse is drawn with. Used by the server's checks and by
 * the viewer alike.
 */

export interface BoxNm {
  xMin: number
  yMin: number
  xMax: number
  yMax: number
}

function boxOf(points: readonly PositionNm[], pad = 0): BoxNm {
  let xMin = Infinity
  let yMin = Infinity
  let xMax = -Infinity
  let yMax = -Infinity
  for (const [x, y] of points) {
    xMin = Math.min(xMin, x)
    yMin = Math.min(yMin, y)
    xMax = Math.max(xMax, x)
    yMax = Math.max(yMax, y)
  }
  return { xMin: xMin - pad, yMin: yMin - pad, xMax: xMax + pad, yMax: yMax + pad }
}

/** Half extents of an ellipse rotated by `rotation` degrees, along x and y. */
function ellipseHalfExtents(radii: readonly [number, number], rotation: number): [number, number] {
  const t = (rotation * Math.PI) / 180
  const [a, b] = radii
  return [
    Math.hypot(a * Math.cos(t), b * Math.sin(t)),
    Math.hypot(a * Math.sin(t), b * Math.cos(t)),
  ]
}

/** The smallest axis-aligned box holding the region (a line's band included). */
export function regionBounds(g: RegionGeometry): BoxNm {
  switch (g.type) {
    case 'Point':
      return boxOf([g.coordinates])
    case 'LineString':
      return boxOf(g.coordinates, g.width / 2)
    case 'Polygon':
      return boxOf(g.coordinates[0] ?? [])
    case 'Ellipse': {
      const [hx, hy] = ellipseHalfExtents(g.radii, g.rotation)
      const [cx, cy] = g.center
      return { xMin: cx - hx, yMin: cy - hy, xMax: cx + hx, yMax: cy + hy }
    }
  }
}

export const boxesMeet = (a: BoxNm, b: BoxNm) =>
  a.xMin <= b.xMax && b.xMin <= a.xMax && a.yMin <= b.yMax && b.yMin <= a.yMax

/** Twice the signed area of a closed ring (shoelace formula). */
function doubleArea(ring: readonly PositionNm[]): number {
  let sum = 0
  for (let i = 0; i + 1 < ring.length; i++) {
    const [x1, y1] = ring[i]!
    const [x2, y2] = ring[i + 1]!
    sum += x1 * y2 - x2 * y1
  }
  return sum
}

const orientation = (a: PositionNm, b: PositionNm, c: PositionNm) =>
  Math.sign((b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0]))

const onSegment = (a: PositionNm, b: PositionNm, p: PositionNm) =>
  Math.min(a[0], b[0]) <= p[0] &&
  p[0] <= Math.max(a[0], b[0]) &&
  Math.min(a[1], b[1]) <= p[1] &&
  p[1] <= Math.max(a[1], b[1])

/** Whether segments ab and cd share any point (touching and overlapping included). */
export function segmentsMeet(a: PositionNm, b: PositionNm, c: PositionNm, d: PositionNm): boolean {
  const o1 = orientation(a, b, c)
  const o2 = orientation(a, b, d)
  const o3 = orientation(c, d, a)
  const o4 = orientation(c, d, b)
  if (o1 !== o2 && o3 !== o4) return true
  return (
    (o1 === 0 && onSegment(a, b, c)) ||
    (o2 === 0 && onSegment(a, b, d)) ||
    (o3 === 0 && onSegment(c, d, a)) ||
    (o4 === 0 && onSegment(c, d, b))
  )
}

/**
 * Whether a closed ring crosses or touches itself anywhere other than where neighbouring edges
 * join. Pairs of edges are tested with a box check first; rings are bounded by
 * MAX_REGION_VERTICES, so the quadratic walk stays well under a second.
 */
export function ringSelfIntersects(ring: readonly PositionNm[]): boolean {
  const n = ring.length - 1 // edges; the last position repeats the first
  for (let i = 0; i < n; i++) {
    const a = ring[i]!
    const b = ring[i + 1]!
    const axMin = Math.min(a[0], b[0])
    const axMax = Math.max(a[0], b[0])
    const ayMin = Math.min(a[1], b[1])
    const ayMax = Math.max(a[1], b[1])
    for (let j = i + 1; j < n; j++) {
      const adjacent = j === i + 1 || (i === 0 && j === n - 1)
      if (adjacent) continue
      const c = ring[j]!
      const d = ring[j + 1]!
      if (
        Math.max(c[0], d[0]) < axMin ||
        Math.min(c[0], d[0]) > axMax ||
        Math.max(c[1], d[1]) < ayMin ||
        Math.min(c[1], d[1]) > ayMax
      )
        continue
      if (segmentsMeet(a, b, c, d)) return true
    }
    // Neighbouring edges that fold back onto each other overlap along a line.
    const next = ring[i + 2 <= n ? i + 2 : 1]!
    if (orientation(a, b, next) === 0 && onSegment(a, b, next) && !samePoint(b, next)) return true
  }
  return false
}

const samePoint = (a: PositionNm, b: PositionNm) => a[0] === b[0] && a[1] === b[1]

/** What is wrong with a region's shape, in words, or null when it may be stored. */
export function regionGeometryProblem(g: RegionGeometry): string | null {
  if (g.type === 'Polygon') {
    const ring = g.coordinates[0] ?? []
    if (ringSelfIntersects(ring))
      return 'The polygon crosses itself; draw its outline without crossings.'
    if (doubleArea(ring) === 0) return 'The polygon encloses no area.'
  }
  if (g.type === 'LineString') {
    const [first] = g.coordinates
    if (g.coordinates.every((p) => first && samePoint(p, first))) return 'The line has no length.'
  }
  return null
}

/** The outline of an ellipse as a closed ring of `steps` vertices (for drawing and containment). */
export function ellipseRing(
  g: Extract<RegionGeometry, { type: 'Ellipse' }>,
  steps = 64,
): PositionNm[] {
  const t = (g.rotation * Math.PI) / 180
  const [cx, cy] = g.center
  const [a, b] = g.radii
  const ring: PositionNm[] = []
  for (let i = 0; i < steps; i++) {
    const s = (2 * Math.PI * i) / steps
    const ex = a * Math.cos(s)
    const ey = b * Math.sin(s)
    ring.push([cx + ex * Math.cos(t) - ey * Math.sin(t), cy + ex * Math.sin(t) + ey * Math.cos(t)])
  }
  ring.push(ring[0]!)
  return ring
}

/** The point a view zooms to and the box it fits, for any region. */
export function regionCentre(g: RegionGeometry): PositionNm {
  const b = regionBounds(g)
  return [(b.xMin + b.xMax) / 2, (b.yMin + b.yMax) / 2]
}
