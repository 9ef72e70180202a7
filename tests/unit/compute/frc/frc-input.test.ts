// @vitest-environment node
import { describe, expect, it } from 'vitest'
import { computeFrc, FRC_DEFAULTS } from '../../../../server/compute/frc'
import type { Localizations } from '../../../../server/compute/localizations.types'
import { createRandom } from '../../../fixtures/spot-simulation'
import { filamentEmitters, localize } from './simulated-points'

/** A guard against a hung test only: each simulation takes a few seconds on an idle machine. */
const SIMULATION_TIMEOUT = { timeout: 60_000 }

function table(x: number[], y: number[], frame: number[]): Localizations {
  return {
    count: x.length,
    x: Float64Array.from(x),
    y: Float64Array.from(y),
    frame: Float64Array.from(frame),
  }
}

function scattered(count: number, frames: number, seed = 1): Localizations {
  const random = createRandom(seed)
  const x = Array.from({ length: count }, () => random() * 2000)
  const y = Array.from({ length: count }, () => random() * 2000)
  const frame = Array.from({ length: count }, () => Math.floor(random() * frames))
  return table(x, y, frame)
}

function expectNoValue(locs: Localizations, reason: RegExp, options = {}) {
  const result = computeFrc(locs, options)
  expect(result.resolutionNm).toBeNull()
  expect(result.resolutionUncorrectedNm).toBeNull()
  expect(result.reason).toMatch(reason)
  expect(result.method).toMatch(/Nieuwenhuizen 2013/)
  expect(JSON.parse(JSON.stringify(result))).toEqual(result)
}

describe('computeFrc on bad input (null values with a reason, never a throw)', () => {
  it('refuses too few localizations', () => {
    expectNoValue(scattered(50, 1000), /only 50 localizations/)
    expectNoValue(table([], [], []), /only 0 localizations/)
  })

  it('refuses a single frame', () => {
    expectNoValue(scattered(500, 1), /one frame/)
  })

  it('refuses fewer distinct frames than blocks', () => {
    expectNoValue(scattered(500, 20), /20 distinct frames for 50 time blocks/)
  })

  it('refuses points on one straight line', () => {
    const t = Array.from({ length: 500 }, (_, i) => i * 3.7)
    expectNoValue(
      table(
        t,
        t.map((v) => 2 * v + 5),
        t.map((_, i) => i),
      ),
      /one straight line/,
    )
  })

  it('refuses rows without finite positions', () => {
    const locs = scattered(500, 1000)
    locs.x.fill(NaN)
    expectNoValue(locs, /finite x, y and frame/)
  })

  it('says when a split leaves one half empty', () => {
    // Frames 0–1 and 1000 only: with 3 blocks the middle one is empty; when it is the only block
    // of one half, that half holds nothing (a third of all deals).
    const random = createRandom(4)
    const count = 600
    const x = Array.from({ length: count }, () => random() * 1000)
    const y = Array.from({ length: count }, () => random() * 1000)
    const frame = Array.from({ length: count }, (_, i) => (i % 2 === 0 ? i % 4 : 1000))
    const reasons = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12].map(
      (seed) => computeFrc(table(x, y, frame), { blocks: 3, seed }).reason ?? '',
    )
    expect(reasons.some((reason) => /half .* no localizations/.test(reason))).toBe(true)
  })
})

describe('computeFrc parameters and conventions', SIMULATION_TIMEOUT, () => {
  const sim = localize(
    filamentEmitters(createRandom(3), { emitters: 4000, fieldNm: 3000, lengthNm: 1500 }),
    { frames: 2000, extraBurstsMean: 0, burstLengthMean: 1, precisionNm: 8 },
    4,
  )

  it('documents its defaults', () => {
    expect(FRC_DEFAULTS).toMatchObject({ pixelNm: 5, blocks: 50, maxSize: 4096, seed: 1 })
    const result = computeFrc(sim.locs, { splits: 1 })
    expect(result.threshold).toBeCloseTo(1 / 7, 12)
    expect(result.parameters).toMatchObject({ pixelNm: 5, blocks: 50, gridSize: 1024 })
    expect(result.parameters.field).toBe('occupied bounding box')
    expect(result.curve.frequencyPerNm).toHaveLength(513)
    // Lattice points with round(√(u² + v²)) = 10, enumerated directly outside this code: 56.
    expect(result.curve.pixelsInRing[10]).toBe(56)
  })

  it('gives the same result for the same seed and column types', () => {
    const first = computeFrc(sim.locs, { splits: 2, seed: 9 })
    const narrow = {
      ...sim.locs,
      x: Float32Array.from(sim.locs.x),
      y: Float32Array.from(sim.locs.y),
      frame: Uint32Array.from(sim.locs.frame),
    }
    const again = computeFrc(sim.locs, { splits: 2, seed: 9 })
    expect(again).toEqual(first)
    const fromNarrow = computeFrc(narrow, { splits: 2, seed: 9 })
    expect(fromNarrow.resolutionNm!).toBeCloseTo(first.resolutionNm!, 0)
  })

  it('skips rows with NaN and reports the rows used', () => {
    const count = sim.locs.count
    const withNaN: Localizations = {
      count: count + 2,
      x: Float64Array.from([...sim.locs.x, NaN, 100]),
      y: Float64Array.from([...sim.locs.y, 100, Infinity]),
      frame: Float64Array.from([...sim.locs.frame, 5, 6]),
    }
    const plain = computeFrc({ ...sim.locs, uncertainty: undefined }, { splits: 1 })
    const result = computeFrc(withNaN, { splits: 1 })
    expect(result.resolutionNm).toBe(plain.resolutionNm)
    expect(result.parameters.localizationsUsed).toBe(count)
  })

  it('says the correction could not be made without precisions', () => {
    const result = computeFrc({ ...sim.locs, uncertainty: undefined }, { splits: 1 })
    expect(result.parameters.spuriousCorrection).toMatch(/not made: .*no localization precision/)
    expect(result.localizationsPerEmitter).toBeNull()
    expect(result.curve.corrected).toBeUndefined()
    expect(result.resolutionNm).toBe(result.resolutionUncorrectedNm)
  })

  it('crops to the central field when the box exceeds maxSize', () => {
    const result = computeFrc(sim.locs, { splits: 1, maxSize: 100 })
    expect(result.parameters.gridSize).toBe(64)
    expect(result.parameters.field).toBe('central crop of the bounding box')
    expect(result.parameters.localizationsUsed).toBeLessThan(sim.locs.count)
  })
})
