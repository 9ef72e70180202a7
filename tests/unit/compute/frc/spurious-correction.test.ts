// @vitest-environment node
import { describe, expect, it } from 'vitest'
import { computeFrc } from '../../../../server/compute/frc'
import {
  correctedFrc,
  estimateRepeats,
  pixelTransfer,
  precisionTransfer,
} from '../../../../server/compute/frc/spurious-correction'
import { createRandom } from '../../../fixtures/spot-simulation'
import { expectedRepeats, localize, normal, uniformEmitters } from './simulated-points'

/** A guard against a hung test only: each simulation takes a few seconds on an idle machine. */
const SIMULATION_TIMEOUT = { timeout: 60_000 }

describe('H(q), the precision transfer', () => {
  // Source: DOMAIN.md §1.4 step 6 — for σ ~ Normal(m, d²):
  // ⟨exp(−4π²σ²q²)⟩ = exp(−4π²m²q²/(1 + 8π²d²q²)) / √(1 + 8π²d²q²).
  it('matches the closed form for normally distributed precisions', () => {
    const random = createRandom(12)
    const [m, d] = [10, 2]
    const sigma = Float64Array.from({ length: 400_000 }, () => m + d * normal(random))
    const q = [0, 0.01, 0.02, 0.03, 0.05]
    const { transfer } = precisionTransfer(sigma, sigma.length, q) as { transfer: Float64Array }
    q.forEach((qk, k) => {
      const spread = 1 + 8 * Math.PI ** 2 * d * d * qk * qk
      const expected = Math.exp((-4 * Math.PI ** 2 * m * m * qk * qk) / spread) / Math.sqrt(spread)
      expect(transfer[k]).toBeCloseTo(expected, 3)
    })
  })

  // Source: Gaussian characteristic function — two independent errors of SD σ₁, σ₂ give
  // exp(−2π²(σ₁² + σ₂²)q²); equal σ gives exp(−4π²σ²q²), so both pairings agree for a fixed σ.
  it('gives the same H for both pairings when every precision is equal', () => {
    const sigma = new Float64Array(1000).fill(8)
    const q = [0.01, 0.04]
    const same = precisionTransfer(sigma, 1000, q, 'same') as { transfer: Float64Array }
    const independent = precisionTransfer(sigma, 1000, q, 'independent') as {
      transfer: Float64Array
    }
    q.forEach((qk, k) => {
      const expected = Math.exp(-4 * Math.PI ** 2 * 64 * qk * qk)
      expect(same.transfer[k]).toBeCloseTo(expected, 3)
      expect(independent.transfer[k]).toBeCloseTo(expected, 3)
    })
  })

  it('says why it cannot be formed without precisions', () => {
    expect(precisionTransfer(undefined, 10, [0])).toHaveProperty('reason')
    expect(precisionTransfer(new Float32Array(10).fill(NaN), 10, [0])).toHaveProperty('reason')
  })

  // Source: sinc² of the pixel at Nyquist, (sin(π/2)/(π/2))² = 4/π² (arithmetic).
  it('uses sinc² for the pixel', () => {
    expect(pixelTransfer(0, 5)).toBe(1)
    expect(pixelTransfer(1 / 10, 5)).toBeCloseTo(4 / Math.PI ** 2, 12)
  })
})

describe('Q and the corrected curve', SIMULATION_TIMEOUT, () => {
  // Source: the model of DOMAIN.md §1.4 step 6 — a numerator made only of the spurious term
  // Q·H·sinc²/(1/N_A + 1/N_B) must give back Q, and the corrected FRC (num − spur)/(den + spur) 0.
  it('returns Q from a numerator that holds only the spurious term', () => {
    const rings = 200
    const transfer = Float64Array.from({ length: rings }, (_, k) => Math.exp(-((k / 60) ** 2)))
    const scale = 1 / 3000 + 1 / 5000
    const numerator = transfer.map((t) => (4.2 * t) / scale)
    const denominator = new Float64Array(rings).fill(Math.sqrt(3000 * 5000))
    const pixels = Float64Array.from({ length: rings }, (_, k) => Math.max(1, 2 * Math.PI * k))
    const estimate = estimateRepeats(numerator, denominator, transfer, pixels, scale)
    expect(estimate.repeats).toBeCloseTo(4.2, 10)
    const corrected = correctedFrc(numerator, denominator, transfer, 4.2, scale)
    for (const value of corrected) expect(value).toBeCloseTo(0, 10)
  })

  // Source: simulation with ground truth (simulated-points.ts `expectedRepeats`): structureless
  // uniform emitters, each localized 1 + Poisson(4) times in single frames across the run, log-normal
  // precision spread 0.3 around 10 nm. Measured Q* ≈ 4.8; 'independent' gave 4.6–5.2 (3 seeds),
  // 'same' (DOMAIN.md's H) 1.6–2.5: with varying σ it overstates H at high q and so understates Q.
  it('recovers Q with independent precision pairing when precisions vary', () => {
    const sim = localize(
      uniformEmitters(createRandom(31), 8000, 20_000),
      {
        frames: 10_000,
        extraBurstsMean: 4,
        burstLengthMean: 1,
        precisionNm: 10,
        precisionSpread: 0.3,
      },
      32,
    )
    const target = expectedRepeats(sim, 10_000, 50)
    const independent = computeFrc(sim.locs, { splits: 2, precisionPairing: 'independent' })
    const same = computeFrc(sim.locs, { splits: 2, precisionPairing: 'same' })
    expect(target).toBeCloseTo(4.8, 0)
    expect(Math.abs(independent.localizationsPerEmitter! - target)).toBeLessThan(0.6)
    expect(same.localizationsPerEmitter!).toBeLessThan(0.7 * target)
  })
})
