import { describe, expect, it } from 'vitest'
import { erf, normalCdf } from '../../../../server/compute/render'

describe('erf and the normal CDF', () => {
  // Reference values: Python's math.erf (the C library's erf), printed while writing this test;
  // they agree with the published tables of erf (Abramowitz & Stegun, table 7.1, from memory).
  it.each([
    [0.5, 0.5204998778130465],
    [1, 0.8427007929497149],
    [2, 0.9953222650189527],
    [3, 0.9999779095030014],
    [-1, -0.8427007929497149],
  ])('erf(%s) = %s', (x, expected) => {
    expect(Math.abs(erf(x) - expected)).toBeLessThan(1e-12)
  })

  it('Φ(1.96) = 0.9750 and Φ(0) = 0.5 (standard normal table, common knowledge)', () => {
    expect(normalCdf(1.96)).toBeCloseTo(0.9750021, 6)
    expect(normalCdf(0)).toBe(0.5)
    expect(normalCdf(-20)).toBe(0)
    expect(normalCdf(20)).toBe(1)
  })

  it('Φ between table points matches erf to 1e-7 (the interpolation bound h²/8·max|Φ″|)', () => {
    for (let t = -5; t <= 5; t += 0.01237) {
      expect(Math.abs(normalCdf(t) - 0.5 * (1 + erf(t / Math.SQRT2)))).toBeLessThan(1e-7)
    }
  })
})
