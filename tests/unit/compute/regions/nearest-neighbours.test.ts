import { describe, expect, it } from 'vitest'
import { nearestNeighbourDistances } from '@server/compute/regions'
import { Random } from '@server/compute/simulate'
import { concat, gaussianClusters, spacedCentres, uniformPoints } from './point-sets'

describe('nearest-neighbour distances', () => {
  it('equal a brute-force search on clustered and sparse points', () => {
    const random = new Random(2)
    const p = concat(
      gaussianClusters(spacedCentres(5, 4000, 200, 500, random), 100, 5, random),
      uniformPoints(300, 4000, 4000, 3),
    )
    const d = nearestNeighbourDistances(p.x, p.y, p.count, 16e6)
    for (let i = 0; i < p.count; i++) {
      let best = Infinity
      for (let j = 0; j < p.count; j++)
        if (j !== i) best = Math.min(best, Math.hypot(p.x[i]! - p.x[j]!, p.y[i]! - p.y[j]!))
      expect(d[i]).toBeCloseTo(best, 9)
    }
  })

  it('under CSR the mean is 1/(2√λ) (Clark & Evans 1954), away from the edges', () => {
    const p = uniformPoints(40_000, 10_000, 10_000, 8)
    const d = nearestNeighbourDistances(p.x, p.y, p.count, 1e8)
    let sum = 0
    let n = 0
    for (let i = 0; i < p.count; i++)
      if (p.x[i]! > 500 && p.x[i]! < 9500 && p.y[i]! > 500 && p.y[i]! < 9500) {
        sum += d[i]!
        n++
      }
    expect(Math.abs(sum / n - 0.5 / Math.sqrt(40_000 / 1e8))).toBeLessThan(0.5) // 25 nm
  })

  it('is NaN for a lone point', () => {
    expect(Number.isNaN(nearestNeighbourDistances([1], [2], 1, 100)[0])).toBe(true)
  })
})
