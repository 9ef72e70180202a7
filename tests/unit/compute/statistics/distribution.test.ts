import { describe, expect, it } from 'vitest'
import { createRandom } from '@server/compute/simulate'
import { distribution } from '@server/compute/statistics'

/** Exact quantile by sorting: the value of rank ⌈p·n⌉ (the definition the module states). */
function exactQuantile(sorted: Float64Array, p: number): number {
  return sorted[Math.max(1, Math.ceil(p * sorted.length)) - 1] ?? NaN
}

function finiteSorted(values: ArrayLike<number>): Float64Array {
  return Float64Array.from(Array.from(values).filter(Number.isFinite)).sort()
}

function logNormalColumn(n: number, seed: number): Float32Array {
  const random = createRandom(seed)
  return Float32Array.from({ length: n }, () => random.logNormal(1500, 0.5))
}

const columns: [string, () => Float32Array | Float64Array][] = [
  ['log-normal photons', () => logNormalColumn(100_001, 1)],
  [
    'uniform',
    () => {
      const random = createRandom(2)
      return Float64Array.from({ length: 50_000 }, () => random.uniform() * 80 - 40)
    },
  ],
  [
    'two modes with a gap',
    () => {
      const random = createRandom(3)
      return Float64Array.from({ length: 40_000 }, (_, i) => (i % 2 ? 1000 : 0) + random.normal())
    },
  ],
  [
    'outliers far beyond the bulk (sample misses them: exact-range fallback)',
    () => {
      const values = logNormalColumn(30_000, 4)
      for (let i = 0; i < 600; i++) values[i * 50] = 1e9
      return values
    },
  ],
]

describe('distribution: histogram counts against a brute-force count', () => {
  it.each(columns)('%s', (_name, make) => {
    const values = make()
    values[10] = NaN
    values[11] = Infinity
    values[12] = -Infinity
    const result = distribution(values)
    const d = result.value
    if (!d) throw new Error(result.reason)
    const sorted = finiteSorted(values)
    // Brute force: count every finite value into [edge i, edge i+1) by comparison.
    const counts = new Array<number>(d.counts.length).fill(0)
    let below = 0
    let above = 0
    for (const v of sorted) {
      if (v < (d.edges[0] ?? NaN)) below++
      else if (v >= (d.edges[d.edges.length - 1] ?? NaN)) above++
      else {
        const bin = d.edges.findIndex((edge, i) => v >= edge && v < (d.edges[i + 1] ?? -Infinity))
        counts[bin] = (counts[bin] ?? 0) + 1
      }
    }
    expect(d.counts).toEqual(counts)
    expect([d.below, d.above]).toEqual([below, above])
    expect(d.count).toBe(sorted.length)
    expect(d.nonFinite).toEqual({ nan: 1, positiveInfinity: 1, negativeInfinity: 1 })
    expect(d.counts.length).toBeLessThanOrEqual(100)
  })
})

describe('distribution: quantiles against an exact sort', () => {
  it.each(columns)('%s: error at most the stated resolution', (_name, make) => {
    const values = make()
    const d = distribution(values).value
    const sorted = finiteSorted(values)
    const tolerance = (d?.quantileResolution ?? 0) * (1 + 1e-9)
    expect(Math.abs((d?.median ?? NaN) - exactQuantile(sorted, 0.5))).toBeLessThanOrEqual(tolerance)
    expect(Math.abs((d?.lowerQuartile ?? NaN) - exactQuantile(sorted, 0.25))).toBeLessThanOrEqual(
      tolerance,
    )
    expect(Math.abs((d?.upperQuartile ?? NaN) - exactQuantile(sorted, 0.75))).toBeLessThanOrEqual(
      tolerance,
    )
    // The plotting range holds the 0.5th and 99.5th percentiles, widened by less than a fine bin.
    const first = d?.edges[0] ?? NaN
    const last = d?.edges[d.edges.length - 1] ?? NaN
    expect(first).toBeLessThanOrEqual(exactQuantile(sorted, 0.005))
    expect(exactQuantile(sorted, 0.005) - first).toBeLessThan(tolerance)
    expect(last).toBeGreaterThan(exactQuantile(sorted, 0.995))
  })

  it('the mean is the mean of the finite values', () => {
    const values = Float64Array.from([1, 2, 3, NaN, 4, Infinity])
    expect(distribution(values).value?.mean).toBe(2.5)
  })

  it('a small integer column with ties keeps quantiles within the resolution', () => {
    const values = Uint16Array.from({ length: 999 }, (_, i) => i % 7)
    const d = distribution(values).value
    const sorted = finiteSorted(values)
    expect(Math.abs((d?.median ?? NaN) - exactQuantile(sorted, 0.5))).toBeLessThanOrEqual(
      d?.quantileResolution ?? 0,
    )
  })
})

describe('distribution: data it cannot describe', () => {
  it('no rows and no finite values give a reason, never a throw', () => {
    expect(distribution(new Float32Array(0)).reason).toMatch(/no rows/)
    const allNaN = distribution(Float32Array.from([NaN, NaN, Infinity]))
    expect(allNaN.value).toBeNull()
    expect(allNaN.reason).toMatch(/no finite values/)
  })

  it('a constant column has that value as every quantile', () => {
    const d = distribution(new Float32Array(1000).fill(7)).value
    expect(d?.median).toBeCloseTo(7, 3)
    expect(d?.counts.reduce((a, c) => a + c, 0)).toBe(1000)
  })
})
