import { createRequire } from 'node:module'
import { describe, expect, it } from 'vitest'
import { dbscan } from '@server/compute/regions'
import { Random } from '@server/compute/simulate'
import { concat, gaussianClusters, spacedCentres, uniformPoints, type PointSet } from './point-sets'

// Independent reference: the npm package density-clustering 1.3.0 (Lukasz Krawczyk, MIT), a
// general-purpose DBSCAN with brute-force neighbourhoods; it counts the point itself in minPts.
const require = createRequire(import.meta.url)
const { DBSCAN } = require('density-clustering') as {
  DBSCAN: new () => {
    run(data: number[][], eps: number, minPts: number): number[][]
    noise: number[]
  }
}

function neighbourCounts(points: PointSet, eps: number): number[] {
  const counts: number[] = []
  for (let i = 0; i < points.count; i++) {
    let n = 0
    for (let j = 0; j < points.count; j++)
      if (Math.hypot(points.x[i]! - points.x[j]!, points.y[i]! - points.y[j]!) <= eps) n++
    counts.push(n)
  }
  return counts
}

describe('DBSCAN against the density-clustering package (same points, same eps and minPts)', () => {
  for (const seed of [1, 2, 3]) {
    it(`identical clusters of core points and identical noise (seed ${seed})`, () => {
      const random = new Random(seed)
      const points = concat(
        gaussianClusters(spacedCentres(12, 3000, 150, 200, random), 25, 15, random),
        uniformPoints(200, 3000, 3000, seed + 100),
      )
      const eps = 30
      const minPts = 5
      const ours = dbscan(points.x, points.y, points.count, { eps, minPts })
      const reference = new DBSCAN()
      const theirClusters = reference.run(
        Array.from({ length: points.count }, (_, i) => [points.x[i]!, points.y[i]!]),
        eps,
        minPts,
      )
      const theirs = new Int32Array(points.count).fill(-1)
      theirClusters.forEach((members, c) => members.forEach((i) => (theirs[i] = c)))
      const core = neighbourCounts(points, eps).map((n) => n >= minPts)

      expect(ours.clusters.length).toBe(theirClusters.length)
      expect(ours.noise).toBe(reference.noise.filter((i) => theirs[i] === -1).length)
      // Same partition of the core points, up to the clusters' numbering.
      const mapping = new Map<number, number>()
      for (let i = 0; i < points.count; i++) {
        if (!core[i]) {
          // A border point may join either neighbouring cluster; noise must agree.
          expect(ours.labels[i] === -1, `point ${i}`).toBe(theirs[i] === -1)
          continue
        }
        const known = mapping.get(ours.labels[i]!)
        if (known === undefined) mapping.set(ours.labels[i]!, theirs[i]!)
        else expect(theirs[i]).toBe(known)
      }
      expect(new Set(mapping.values()).size).toBe(mapping.size)
      expect(ours.clusters.reduce((n, c) => n + c.size, 0) + ours.noise).toBe(points.count)
    })
  }
})

describe('DBSCAN on DOMAIN.md 1.7’s simulation', () => {
  it('finds exactly 10 clusters in 20 of 20 trials (10 × 30 points, σ 10 nm, 5 noise/µm², ε 25, minPts 5)', () => {
    const found: number[] = []
    for (let trial = 0; trial < 20; trial++) {
      const random = new Random(1000 + trial)
      const clusters = gaussianClusters(spacedCentres(10, 5000, 100, 300, random), 30, 10, random)
      const noise = uniformPoints(5 * 25, 5000, 5000, 5000 + trial)
      const points = concat(clusters, noise)
      found.push(dbscan(points.x, points.y, points.count, { eps: 25, minPts: 5 }).clusters.length)
    }
    expect(found).toEqual(new Array(20).fill(10))
  })

  it('reports per cluster its size, convex-hull area and centroid', () => {
    // A 3 × 3 lattice of points 10 nm apart plus a far point: one cluster of 9, one noise point.
    const x = new Float64Array([0, 10, 20, 0, 10, 20, 0, 10, 20, 500])
    const y = new Float64Array([0, 0, 0, 10, 10, 10, 20, 20, 20, 500])
    const r = dbscan(x, y, 10, { eps: 10, minPts: 3 })
    expect(r.clusters).toHaveLength(1)
    expect(r.clusters[0]).toMatchObject({ size: 9, area: 400, centroid: [10, 10] })
    expect(r.clusters[0]!.hull).toHaveLength(4)
    expect(r.noise).toBe(1)
    expect(r.labels[9]).toBe(-1)
  })
})
