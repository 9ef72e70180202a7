// @vitest-environment node
import { describe, expect, it } from 'vitest'
import { frcSmoothingSpan, loessQuadratic } from '../../../../server/compute/frc/loess'
import { createRandom } from '../../../fixtures/spot-simulation'

/**
 * Brute-force weighted least squares: builds XᵀWX and XᵀWy for the design matrix [1, t, t²] and
 * solves them by Gaussian elimination with partial pivoting; returns the fit at t = 0.
 */
function bruteForceFit(t: number[], y: number[], w: number[]): number {
  const matrix = [0, 1, 2].map((row) =>
    [0, 1, 2, 3].map((column) =>
      t.reduce((sum, ti, i) => sum + w[i]! * ti ** row * (column < 3 ? ti ** column : y[i]!), 0),
    ),
  )
  for (let pivot = 0; pivot < 3; pivot++) {
    const best = [pivot, pivot + 1, pivot + 2]
      .filter((r) => r < 3)
      .reduce((a, b) => (Math.abs(matrix[b]![pivot]!) > Math.abs(matrix[a]![pivot]!) ? b : a))
    ;[matrix[pivot], matrix[best]] = [matrix[best]!, matrix[pivot]!]
    for (let r = pivot + 1; r < 3; r++) {
      const factor = matrix[r]![pivot]! / matrix[pivot]![pivot]!
      for (let c = pivot; c < 4; c++) matrix[r]![c]! -= factor * matrix[pivot]![c]!
    }
  }
  const solution = [0, 0, 0]
  for (let r = 2; r >= 0; r--) {
    let sum = matrix[r]![3]!
    for (let c = r + 1; c < 3; c++) sum -= matrix[r]![c]! * solution[c]!
    solution[r] = sum / matrix[r]![r]!
  }
  return solution[0]!
}

/** Tricube weights (Cleveland 1979) with the bandwidth convention documented in loess.ts. */
function windowFit(values: number[], centre: number, first: number, last: number): number {
  const bandwidth = Math.max(centre - first, last - centre) + 1
  const t: number[] = []
  const y: number[] = []
  const w: number[] = []
  for (let j = first; j <= last; j++) {
    t.push(j - centre)
    y.push(values[j]!)
    w.push((1 - (Math.abs(j - centre) / bandwidth) ** 3) ** 3)
  }
  return bruteForceFit(t, y, w)
}

describe('LOESS (local quadratic, tricube)', () => {
  const random = createRandom(17)
  const noisy = Array.from({ length: 60 }, (_, i) => Math.exp(-i / 20) + 0.05 * (random() - 0.5))

  // Source: brute-force weighted least squares at interior and end points.
  it.each([0, 1, 4, 30, 57, 59])('matches a brute-force weighted fit at point %i (span 9)', (i) => {
    const span = 9
    const first = Math.min(Math.max(0, i - 4), noisy.length - span)
    expect(loessQuadratic(noisy, span)[i]).toBeCloseTo(windowFit(noisy, i, first, first + 8), 10)
  })

  // Source: textbook property — a local quadratic fit reproduces any quadratic exactly.
  it('reproduces a quadratic exactly', () => {
    const quadratic = Array.from({ length: 40 }, (_, i) => 0.3 - 0.02 * i + 0.001 * i * i)
    const smoothed = loessQuadratic(quadratic, 11)
    for (let i = 0; i < quadratic.length; i++) expect(smoothed[i]).toBeCloseTo(quadratic[i]!, 10)
  })

  // Source: DOMAIN.md §6 — span max(5, ⌈L/20⌉) rings, made odd.
  it.each([
    [64, 5],
    [128, 7],
    [200, 11],
    [1024, 53],
    [4096, 205],
  ])('spans %i-pixel grids over %i rings', (size, span) => {
    expect(frcSmoothingSpan(size)).toBe(span)
  })
})
