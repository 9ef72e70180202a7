/** Convex hull of a point subset by Andrew's monotone chain (1979); counter-clockwise, not closed. */
export function convexHull(
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  members: ArrayLike<number>,
): [number, number][] {
  const ids = Array.from(members).sort((a, b) => x[a]! - x[b]! || y[a]! - y[b]!)
  if (ids.length < 3) return ids.map((i) => [x[i]!, y[i]!])
  const cross = (o: number, a: number, b: number) =>
    (x[a]! - x[o]!) * (y[b]! - y[o]!) - (y[a]! - y[o]!) * (x[b]! - x[o]!)
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
