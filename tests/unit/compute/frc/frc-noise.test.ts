// @vitest-environment node
import { describe, expect, it } from 'vitest'
import { computeFrc } from '../../../../server/compute/frc'
import { createRandom } from '../../../fixtures/spot-simulation'
import { localize, uniformEmitters } from './simulated-points'

/** A guard against a hung test only: each simulation takes a few seconds on an idle machine. */
const SIMULATION_TIMEOUT = { timeout: 60_000 }

/**
 * Two independent uniform random point sets: every emitter is localized once, so the halves share
 * nothing and FRC is pure noise. Source: DOMAIN.md §1.4 [C, variance formula in the reference code]
 * — FRC scatters around 0 with variance ≈ 1/(pixels in ring); §6 [S] — measured FRC²·n ≈ 1.06
 * without a window and 1.10 with the taper.
 */
describe('FRC of independent random point sets', SIMULATION_TIMEOUT, () => {
  it.each([1, 2])('has mean FRC²·n near 1.10 over the rings (seed %i)', (seed) => {
    const emitters = uniformEmitters(createRandom(seed), 20_000, 100_000)
    const { locs } = localize(
      emitters,
      { frames: 5000, extraBurstsMean: 0, burstLengthMean: 1, precisionNm: 10 },
      seed + 10,
    )
    const result = computeFrc(locs, { pixelNm: 10, splits: 1, seed, correctSpurious: false })
    const { frc, pixelsInRing } = result.curve
    // Rings below 32 still see the square outline of the field, a real structure both halves share.
    let scaledSquares = 0
    let mean = 0
    const rings = frc.length - 32
    for (let k = 32; k < frc.length; k++) {
      scaledSquares += (frc[k]! ** 2 * pixelsInRing[k]!) / rings
      mean += frc[k]! / rings
    }
    expect(result.parameters.gridSize).toBe(2048)
    expect(scaledSquares).toBeGreaterThan(1.0)
    expect(scaledSquares).toBeLessThan(1.2)
    expect(Math.abs(mean)).toBeLessThan(0.005)
  })
})
