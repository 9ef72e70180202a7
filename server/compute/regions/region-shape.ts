/**
 * A region's geometry as the engines use it: its bounding box, its area and an exact containment
 * test, for every drawable shape (polygon, rotated ellipse, line band of a width, point with a
 * radius). Boundaries belong to the region: a localization exactly on an edge, on the ellipse or
 * at the band's half-width is inside, so a rectangle and its edges give the same count however
 * the rectangle was drawn.
 */
import type { RegionGeometry } from '@shared/schemas/region.schema'
import type { Bounds } from '../store'

export interface RegionShape {
  kind: 'polygon' | 'ellipse' | 'band' | 'disc'
  bounds: Bounds
  /** Area inside the region, nm². */
  area: number
  contains(x: number, y: number): boolean
  /** Corners of a polygon's outline (where it may cut a pixel without crossing its corners). */
  vertices?: readonly (readonly [number, number])[]
}

/** A region's geometry can not be measured (self-intersecting, empty, …); the message says why. */
export class RegionShapeError extends Error {}

/** Radius taken around a Point region when the measurement names none, nm. */
export const DEFAULT_POINT_RADIUS_NM = 250

export function regionShape(
  geometry: RegionGeometry,
  pointRadiusNm = DEFAULT_POINT_RADIUS_NM,
): RegionShape {
  switch (geometry.type) {
    case 'Polygon':
      return polygonShape(geometry.coordinates[0]!)
    case 'Ellipse':
      return ellipseShape(geometry.center, geometry.radii, geometry.rotation)
    case 'LineString':
      return bandShape(geometry.coordinates, geometry.width)
    case 'Point':
      return ellipseShape(geometry.coordinates, [pointRadiusNm, pointRadiusNm], 0)
  }
}

function boundsOf(points: readonly (readonly [number, number])[], margin = 0): Bounds {
  let xMin = Infinity
  let xMax = -Infinity
  let yMin = Infinity
  let yMax = -Infinity
  for (const [x, y] of points) {
    xMin = Math.min(xMin, x)
    xMax = Math.max(xMax, x)
    yMin = Math.min(yMin, y)
    yMax = Math.max(yMax, y)
  }
  return { xMin: xMin - margin, xMax: xMax + margin, yMin: yMin - margin, yMax: yMax + margin }
}

/** Signed area of a closed ring (shoelace), nm². */
export function ringArea(ring: readonly (readonly [number, number])[]): number {
  let twice = 0
  for (let i = 0; i + 1 < ring.length; i++) {
    const [x0, y0] = ring[i]!
    const [x1, y1] = ring[i + 1]!
    twice += x0 * y1 - x1 * y0
  }
  return twice / 2
}

const orientation = (ax: number, ay: number, bx: number, by: number, cx: number, cy: number) =>
  Math.sign((bx - ax) * (cy - ay) - (by - ay) * (cx - ax))

const onSegment = (ax: number, ay: number, bx: number, by: number, px: number, py: number) =>
  px >= Math.min(ax, bx) &&
  px <= Math.max(ax, bx) &&
  py >= Math.min(ay, by) &&
  py <= Math.max(ay, by)

function segmentsCross(
  a: readonly [number, number],
  b: readonly [number, number],
  c: readonly [number, number],
  d: readonly [number, number],
): boolean {
  const o1 = orientation(a[0], a[1], b[0], b[1], c[0], c[1])
  const o2 = orientation(a[0], a[1], b[0], b[1], d[0], d[1])
  const o3 = orientation(c[0], c[1], d[0], d[1], a[0], a[1])
  const o4 = orientation(c[0], c[1], d[0], d[1], b[0], b[1])
  if (o1 !== o2 && o3 !== o4) return true
  return (
    (o1 === 0 && onSegment(a[0], a[1], b[0], b[1], c[0], c[1])) ||
    (o2 === 0 && onSegment(a[0], a[1], b[0], b[1], d[0], d[1])) ||
    (o3 === 0 && onSegment(c[0], c[1], d[0], d[1], a[0], a[1])) ||
    (o4 === 0 && onSegment(c[0], c[1], d[0], d[1], b[0], b[1]))
  )
}

/** First pair of non-adjacent edges that touch or cross, as edge numbers; null for a simple ring. */
export function selfIntersection(
  ring: readonly (readonly [number, number])[],
): [number, number] | null {
  const edges = ring.length - 1
  const box = (i: number) => boundsOf([ring[i]!, ring[i + 1]!])
  const boxes = Array.from({ length: edges }, (_, i) => box(i))
  for (let i = 0; i < edges; i++) {
    const bi = boxes[i]!
    for (let j = i + 2; j < edges; j++) {
      if (i === 0 && j === edges - 1) continue // the closing edge shares the first vertex
      const bj = boxes[j]!
      if (bj.xMin > bi.xMax || bj.xMax < bi.xMin || bj.yMin > bi.yMax || bj.yMax < bi.yMin) continue
      if (segmentsCross(ring[i]!, ring[i + 1]!, ring[j]!, ring[j + 1]!)) return [i, j]
    }
  }
  return null
}

/**
 * Point in polygon by crossings of a ray towards +x, each edge taken half-open in y so a vertex on
 * the ray counts once; points on an edge are tested first and are inside. Edges are bucketed by
 * horizontal bands so a point only visits the edges its y meets (outlines of thousands of vertices).
 */
function polygonShape(ring: readonly (readonly [number, number])[]): RegionShape {
  const crossing = selfIntersection(ring)
  if (crossing)
    throw new RegionShapeError(
      `The polygon's outline crosses itself (edges ${crossing[0] + 1} and ${crossing[1] + 1}); draw it without crossings.`,
    )
  const area = Math.abs(ringArea(ring))
  if (!(area > 0)) throw new RegionShapeError('The polygon encloses no area.')
  const bounds = boundsOf(ring)
  const edges = ring.length - 1
  const xs = new Float64Array(ring.map((p) => p[0]))
  const ys = new Float64Array(ring.map((p) => p[1]))
  const bandCount = Math.max(1, Math.min(1024, edges))
  const bandHeight = (bounds.yMax - bounds.yMin) / bandCount || 1
  const bandOf = (y: number) =>
    Math.min(bandCount - 1, Math.max(0, Math.floor((y - bounds.yMin) / bandHeight)))
  const bands: number[][] = Array.from({ length: bandCount }, () => [])
  for (let e = 0; e < edges; e++) {
    const lo = bandOf(Math.min(ys[e]!, ys[e + 1]!))
    const hi = bandOf(Math.max(ys[e]!, ys[e + 1]!))
    for (let b = lo; b <= hi; b++) bands[b]!.push(e)
  }
  const bandEdges = bands.map((b) => Uint32Array.from(b))
  return {
    kind: 'polygon',
    bounds,
    area,
    vertices: ring,
    contains(px, py) {
      if (px < bounds.xMin || px > bounds.xMax || py < bounds.yMin || py > bounds.yMax) return false
      const list = bandEdges[bandOf(py)]!
      let inside = false
      for (let k = 0; k < list.length; k++) {
        const e = list[k]!
        const x0 = xs[e]!
        const y0 = ys[e]!
        const x1 = xs[e + 1]!
        const y1 = ys[e + 1]!
        if (py < Math.min(y0, y1) || py > Math.max(y0, y1)) continue
        const cross = (x1 - x0) * (py - y0) - (y1 - y0) * (px - x0)
        if (cross === 0 && px >= Math.min(x0, x1) && px <= Math.max(x0, x1)) return true
        if (y0 > py !== y1 > py) {
          // The edge crosses the ray's line; the crossing is right of the point when the sign of
          // `cross` agrees with the edge's direction in y.
          if (y1 > y0 ? cross > 0 : cross < 0) inside = !inside
        }
      }
      return inside
    },
  }
}

function ellipseShape(
  center: readonly [number, number],
  radii: readonly [number, number],
  rotationDeg: number,
): RegionShape {
  const [cx, cy] = center
  const [a, b] = radii
  const angle = (rotationDeg * Math.PI) / 180
  const cos = Math.cos(angle)
  const sin = Math.sin(angle)
  // Half-extents of the rotated ellipse's bounding box.
  const hx = Math.sqrt((a * cos) ** 2 + (b * sin) ** 2)
  const hy = Math.sqrt((a * sin) ** 2 + (b * cos) ** 2)
  const circle = a === b
  return {
    kind: circle ? 'disc' : 'ellipse',
    bounds: { xMin: cx - hx, xMax: cx + hx, yMin: cy - hy, yMax: cy + hy },
    area: Math.PI * a * b,
    contains(px, py) {
      const dx = px - cx
      const dy = py - cy
      if (circle) return dx * dx + dy * dy <= a * a
      const u = (dx * cos + dy * sin) / a
      const v = (-dx * sin + dy * cos) / b
      return u * u + v * v <= 1
    },
  }
}

/** Squared distance from (px, py) to the segment (x0, y0)–(x1, y1). */
export function segmentDistanceSquared(
  px: number,
  py: number,
  x0: number,
  y0: number,
  x1: number,
  y1: number,
): number {
  const dx = x1 - x0
  const dy = y1 - y0
  const length2 = dx * dx + dy * dy
  let t = length2 > 0 ? ((px - x0) * dx + (py - y0) * dy) / length2 : 0
  t = Math.max(0, Math.min(1, t))
  const ex = px - (x0 + t * dx)
  const ey = py - (y0 + t * dy)
  return ex * ex + ey * ey
}

/** Every point within width/2 of the line (round ends and joins). */
function bandShape(line: readonly (readonly [number, number])[], width: number): RegionShape {
  const half = width / 2
  const bounds = boundsOf(line, half)
  const xs = new Float64Array(line.map((p) => p[0]))
  const ys = new Float64Array(line.map((p) => p[1]))
  const half2 = half * half
  const contains = (px: number, py: number) => {
    if (px < bounds.xMin || px > bounds.xMax || py < bounds.yMin || py > bounds.yMax) return false
    for (let s = 0; s + 1 < xs.length; s++) {
      if (segmentDistanceSquared(px, py, xs[s]!, ys[s]!, xs[s + 1]!, ys[s + 1]!) <= half2)
        return true
    }
    return false
  }
  let length = 0
  for (let s = 0; s + 1 < xs.length; s++)
    length += Math.hypot(xs[s + 1]! - xs[s]!, ys[s + 1]! - ys[s]!)
  if (!(length > 0)) throw new RegionShapeError('The line has no length.')
  // One straight segment is a stadium; joins of a bent line overlap, so its area is counted on a grid.
  const area = xs.length === 2 ? length * width + Math.PI * half2 : gridArea(bounds, contains, 512)
  return { kind: 'band', bounds, area, contains }
}

/** Area by counting the centres of a side×side grid over the bounds that fall inside. */
function gridArea(bounds: Bounds, contains: (x: number, y: number) => boolean, side: number) {
  const w = (bounds.xMax - bounds.xMin) / side
  const h = (bounds.yMax - bounds.yMin) / side
  let inside = 0
  for (let j = 0; j < side; j++)
    for (let i = 0; i < side; i++)
      if (contains(bounds.xMin + (i + 0.5) * w, bounds.yMin + (j + 0.5) * h)) inside++
  return inside * w * h
}
