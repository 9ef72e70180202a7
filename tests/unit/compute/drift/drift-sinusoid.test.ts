// @vitest-environment node
import { describe, expect, it } from 'vitest'
import { estimateDrift } from '@server/compute/drift'
import { simulateLocalizations } from '@server/compute/simulate'
import { driftError } from './drift-error'

/**
 * DOMAIN §1.9 / §6 [S]: linear 80 / −50 nm plus a 20 nm sinusoid over 20 000 frames is recovered
 * within ≈ 1 nm RMS (their simulation: 0.34 nm). Ground truth: the seeded simulator's drift track.
 * Measured here: 0.60 nm RMS, 1.2 nm max.
 */
describe('estimateDrift — linear + sinusoidal drift on a simulated static structure', () => {
  // Two correlation passes over 120 000 localizations: seconds on a busy machine, not a timing check.
  it('recovers the drift within 1 nm RMS over all frames', { timeout: 60_000 }, () => {
    const { localizations, truth } = simulateLocalizations({
      seed: 1,
      frames: 20_000,
      drift: { linearNm: { x: 80, y: -50 }, sinusoidAmplitudeNm: { x: 20, y: 20 } },
    })
    const result = estimateDrift(localizations)
    expect(result.reason).toBeUndefined()
    const error = driftError(result.perFrame!, truth.drift)
    expect(error.rmsNm).toBeLessThan(1)
    expect(error.maxNm).toBeLessThan(2.5)
  })
})
