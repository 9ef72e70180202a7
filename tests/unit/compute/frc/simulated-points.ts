/**
 * Small seeded simulations for the FRC tests, with known ground truth: emitters on random straight
 * filaments or uniform over a field, each localized once or in blinking bursts, every localization
 * displaced by Gaussian noise of its own precision (which goes into the uncertainty column).
 */
import type { Localizations } from '../../../../server/compute/localizations.types'
import { createRandom, samplePoisson } from '../../../fixtures/spot-simulation'

export type Random = () => number

export function normal(random: Random): number {
  return Math.sqrt(-2 * Math.log(1 - random())) * Math.cos(2 * Math.PI * random())
}

export interface Emitters {
  x: Float64Array
  y: Float64Array
}

/**
 * Emitters spread uniformly along random straight segments inside a square field, each moved off
 * its segment by an isotropic Gaussian label displacement (labelNm, SD per axis).
 */
export function filamentEmitters(
  random: Random,
  { fieldNm = 8000, filaments = 40, lengthNm = 3000, emitters = 40_000, labelNm = 0 } = {},
): Emitters {
  const starts = Array.from({ length: filaments }, () => {
    const angle = random() * Math.PI
    const cx = fieldNm * (0.15 + 0.7 * random())
    const cy = fieldNm * (0.15 + 0.7 * random())
    return { cx, cy, dx: Math.cos(angle), dy: Math.sin(angle) }
  })
  const x = new Float64Array(emitters)
  const y = new Float64Array(emitters)
  for (let i = 0; i < emitters; i++) {
    const segment = starts[Math.floor(random() * filaments)]!
    const along = (random() - 0.5) * lengthNm
    x[i] = segment.cx + along * segment.dx + labelNm * normal(random)
    y[i] = segment.cy + along * segment.dy + labelNm * normal(random)
  }
  return { x, y }
}

export function uniformEmitters(random: Random, fieldNm: number, emitters: number): Emitters {
  const x = Float64Array.from({ length: emitters }, () => random() * fieldNm)
  const y = Float64Array.from({ length: emitters }, () => random() * fieldNm)
  return { x, y }
}

export interface Blinking {
  frames: number
  /** Mean bursts per emitter beyond the first (Poisson); 0 = one burst each. */
  extraBurstsMean: number
  /** Mean frames per burst (1 + geometric); 1 = single-frame bursts. */
  burstLengthMean: number
  /** Localization precision: fixed, or log-normal around this median with the given spread. */
  precisionNm: number
  precisionSpread?: number
}

function burstLength(random: Random, mean: number): number {
  let length = 1
  const stay = 1 - 1 / mean
  while (random() < stay) length++
  return length
}

export interface Localized {
  locs: Localizations
  /** Emitter of every row (ground truth). */
  emitter: Uint32Array
}

/** Localizations of the emitters: bursts at random start frames, one row per frame on. */
export function localize(emitters: Emitters, blinking: Blinking, seed: number): Localized {
  const random = createRandom(seed)
  const rows: number[][] = [[], [], [], [], []]
  for (let m = 0; m < emitters.x.length; m++) {
    const bursts = 1 + samplePoisson(blinking.extraBurstsMean, random)
    for (let b = 0; b < bursts; b++) {
      const length = burstLength(random, blinking.burstLengthMean)
      const start = Math.floor(random() * Math.max(1, blinking.frames - length))
      for (let f = start; f < start + length && f < blinking.frames; f++) {
        const sigma =
          blinking.precisionNm * Math.exp((blinking.precisionSpread ?? 0) * normal(random))
        rows[0]!.push(emitters.x[m]! + sigma * normal(random))
        rows[1]!.push(emitters.y[m]! + sigma * normal(random))
        rows[2]!.push(f)
        rows[3]!.push(sigma)
        rows[4]!.push(m)
      }
    }
  }
  const locs = {
    count: rows[0]!.length,
    x: Float64Array.from(rows[0]!),
    y: Float64Array.from(rows[1]!),
    frame: Float64Array.from(rows[2]!),
    uncertainty: Float64Array.from(rows[3]!),
  }
  return { locs, emitter: Uint32Array.from(rows[4]!) }
}

/**
 * The Q the spurious-correlation estimate aims at, from ground truth: Σ_m n_A,m·n_B,m ·
 * (1/N_A + 1/N_B), averaged over random deals of `blocks` equal frame blocks to two equal halves.
 * Per emitter with c_b localizations in block b, E[n_A·n_B] = p·(S² − Σ c_b²)/2 with S = Σ c_b and
 * p = (B/2)²/(B(B−1)/2) the chance that two given blocks land in different halves; N_A ≈ N_B ≈ N/2.
 */
export function expectedRepeats(sim: Localized, frames: number, blocks: number): number {
  const perEmitterBlock = new Map<number, number>()
  const perEmitter = new Map<number, number>()
  for (let i = 0; i < sim.locs.count; i++) {
    const m = sim.emitter[i]!
    const block = Math.floor((sim.locs.frame[i]! * blocks) / frames)
    const key = m * blocks + block
    perEmitterBlock.set(key, (perEmitterBlock.get(key) ?? 0) + 1)
    perEmitter.set(m, (perEmitter.get(m) ?? 0) + 1)
  }
  let pairs = 0
  for (const s of perEmitter.values()) pairs += s * s
  for (const c of perEmitterBlock.values()) pairs -= c * c
  const differentHalves = (blocks / 2) ** 2 / ((blocks * (blocks - 1)) / 2)
  return ((differentHalves * pairs) / 2) * (4 / sim.locs.count)
}
