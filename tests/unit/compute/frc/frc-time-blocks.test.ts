// @vitest-environment node
import { describe, expect, it } from 'vitest'
import { computeFrc } from '../../../../server/compute/frc'
import { createRandom } from '../../../fixtures/spot-simulation'
import { localize, uniformEmitters } from './simulated-points'

/** A guard against a hung test only: each simulation takes a few seconds on an idle machine. */
const SIMULATION_TIMEOUT = { timeout: 60_000 }

/**
 * Why halves come from time blocks. Source: DOMAIN.md §6 [S]: structureless uniform emitters
 * (500/µm², precision ≈ 12 nm) in bursts of ~6 frames: a per-localization random split fakes a fine
 * resolution (31 nm there), 50 time blocks do not (378 nm there). A per-localization split is made
 * here by shuffling the frame column, so each time block holds a random sample of localizations.
 */
describe(
  'time-block halves versus per-localization halves on bursty structureless data',
  SIMULATION_TIMEOUT,
  () => {
    it('fakes a fine resolution only with the per-localization split', () => {
      const random = createRandom(8)
      const sim = localize(
        uniformEmitters(random, 4000, 8000),
        { frames: 10_000, extraBurstsMean: 0, burstLengthMean: 6, precisionNm: 12 },
        9,
      )
      const shuffled = Float64Array.from(sim.locs.frame)
      for (let i = shuffled.length - 1; i > 0; i--) {
        const j = Math.floor(random() * (i + 1))
        ;[shuffled[i], shuffled[j]] = [shuffled[j]!, shuffled[i]!]
      }
      const options = { seed: 2, correctSpurious: false }
      const timeBlocks = computeFrc(sim.locs, options)
      const perLocalization = computeFrc({ ...sim.locs, frame: shuffled }, options)
      expect(perLocalization.resolutionNm).not.toBeNull()
      expect(perLocalization.resolutionNm!).toBeLessThan(60)
      // No fine resolution: either no crossing at all or a value of the order of the field's detail.
      expect(timeBlocks.resolutionNm ?? Infinity).toBeGreaterThan(200)
    })
  },
)
