/** Seeded point sets for the region tests: uniform (CSR) and Gaussian clusters. */
import { Random } from '@server/compute/simulate'

export interface PointSet {
  x: Float64Array
  y: Float64Array
  count: number
}

export function uniformPoints(
  n: number,
  width: number,
  height: number,
  seed: number,
  x0 = 0,
  y0 = 0,
): PointSet {
  const random = new Random(seed)
  const x = new Float64Array(n)
  const y = new Float64Array(n)
  for (let i = 0; i < n; i++) {
    x[i] = x0 + random.uniform() * width
    y[i] = y0 + random.uniform() * height
  }
  return { x, y, count: n }
}

export function concat(...sets: PointSet[]): PointSet {
  const count = sets.reduce((n, s) => n + s.count, 0)
  const x = new Float64Array(count)
  const y = new Float64Array(count)
  let at = 0
  for (const s of sets) {
    x.set(s.x.subarray(0, s.count), at)
    y.set(s.y.subarray(0, s.count), at)
    at += s.count
  }
  return { x, y, count }
}

/** Gaussian clusters of `perCluster` points (SD sigma) around the given centres. */
export function gaussianClusters(
  centres: [number, number][],
  perCluster: number,
  sigma: number,
  random: Random,
): PointSet {
  const count = centres.length * perCluster
  const x = new Float64Array(count)
  const y = new Float64Array(count)
  let i = 0
  for (const [cx, cy] of centres)
    for (let k = 0; k < perCluster; k++, i++) {
      x[i] = cx + sigma * random.normal()
      y[i] = cy + sigma * random.normal()
    }
  return { x, y, count }
}

/** `count` centres uniformly in the box [margin, side − margin]², each at least `minGap` from the others. */
export function spacedCentres(
  count: number,
  side: number,
  margin: number,
  minGap: number,
  random: Random,
): [number, number][] {
  const centres: [number, number][] = []
  while (centres.length < count) {
    const c: [number, number] = [
      margin + random.uniform() * (side - 2 * margin),
      margin + random.uniform() * (side - 2 * margin),
    ]
    if (centres.every(([x, y]) => Math.hypot(x - c[0], y - c[1]) >= minGap)) centres.push(c)
  }
  return centres
}

export const rectangle = (x0: number, y0: number, x1: number, y1: number) => ({
  type: 'Polygon' as const,
  coordinates: [
    [
      [x0, y0],
      [x1, y0],
      [x1, y1],
      [x0, y1],
      [x0, y0],
    ] as [number, number][],
  ],
})
