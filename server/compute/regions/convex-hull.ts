/**
 * Convex hull of a point subset by Andrew's monotone chain (1979); counter-clockwise, not closed.
 * Points strictly inside the quadrilateral of the four extreme points (Akl & Toussaint 1978) can
 * not be on the hull and are dropped before the sort: most of a cluster's points.
 */
export function convexHull(
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  members: ArrayLike<number>,
): [number, number][] {
  let left = members[0]!
  let right = left
  let low = left
  let high = left
  for (let k = 1; k < members.length; k++) {
    const i = members[k]!
    if (x[i]! < x[left]!) left = i
    if (x[i]! > x[right]!) right = i
    if (y[i]! < y[low]!) low = i
    if (y[i]! > y[high]!) high = i
  }
  const side = (o: number, a: number, px: number, py: number) =>
    (x[a]! - x[o]!) * (py - y[o]!) - (y[a]! - y[o]!) * (px - x[o]!)
  const ids: number[] = []
  for (let k = 0; k < members.length; k++) {
    const i = members[k]!
    const px = x[i]!
    const py = y[i]!
    if (
      side(left, low, px, py) <= 0 ||
      side(low, right, px, py) <= 0 ||
      side(right, high, px, py) <= 0 ||
      side(high, left, px, py) <= 0
    )
      ids.push(i)
  }
  ids.sort((a, b) => x[a]! - x[b]! || y[a]! - y[b]!)
  if (ids.length < 3) return ids.map((i) => [x[i]!, y[i]!])
  const cross = (o: number, a: number, b: number) => side(o, a, x[b]!, y[b]!)
  const chain = (order: number[]) => {
    const out: number[] = []
    for (const p of order) {
      while (out.length >= 2 && cross(out[out.length - 2]!, out[out.length - 1]!, p) <= 0) out.pop()
      out.push(p)
    }
    out.pop()
    return out
  }
  const hull = [...chain(ids), ...chain([...ids].reverse())]
  return hull.map((i) => [x[i]!, y[i]!])
}

/** Area of a polygon given as an open ring, nm². */
export function polygonArea(ring: [number, number][]): number {
  let twice = 0
  for (let i = 0; i < ring.length; i++) {
    const [x0, y0] = ring[i]!
    const [x1, y1] = ring[(i + 1) % ring.length]!
    twice += x0 * y1 - x1 * y0
  }
  return Math.abs(twice) / 2
}
