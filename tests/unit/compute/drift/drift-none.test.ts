// @vitest-environment node
import { describe, expect, it } from 'vitest'
import { driftAtFrame, estimateDrift } from '@server/compute/drift'
import { simulateLocalizations } from '@server/compute/simulate'
import { driftError } from './drift-error'

describe('estimateDrift — no drift', () => {
  // Two correlation passes over 120 000 localizations: seconds on a busy machine, not a timing check.
  it(
    'finds a trajectory near zero on a static simulated structure (seeded simulator)',
    { timeout: 60_000 },
    () => {
      const { localizations, truth } = simulateLocalizations({ seed: 2, frames: 20_000 })
      const result = estimateDrift(localizations)
      expect(truth.drift).toBeNull()
      const error = driftError(result.perFrame!, null)
      expect(error.rmsNm).toBeLessThan(1)
      expect(result.totalDriftNm).toBeLessThan(3)
    },
  )
})

describe('estimateDrift — data it cannot use', () => {
  const table = (n: number, frameOf: (i: number) => number) => ({
    count: n,
    x: Float64Array.from({ length: n }, (_, i) => (i * 7919) % 5000),
    y: Float64Array.from({ length: n }, (_, i) => (i * 104_729) % 5000),
    frame: Float64Array.from({ length: n }, (_, i) => frameOf(i)),
  })

  it('says so for one frame only', () => {
    const result = estimateDrift(table(5000, () => 3))
    expect(result.trajectory).toBeNull()
    expect(result.reason).toMatch(/one frame/)
  })

  it('says so for too few localizations', () => {
    const result = estimateDrift(table(1500, (i) => i))
    expect(result.trajectory).toBeNull()
    expect(result.reason).toMatch(/too few localizations: 1500/)
  })

  it('says so when nothing is usable', () => {
    const locs = {
      count: 2,
      x: Float64Array.of(Number.NaN, 1),
      y: Float64Array.of(0, Number.NaN),
      frame: Float64Array.of(0, 1),
    }
    expect(estimateDrift(locs).reason).toMatch(/no localization/)
  })

  it('refuses a non-positive render pixel', () => {
    expect(
      estimateDrift(
        table(5000, (i) => i),
        { renderPixelNm: 0 },
      ).reason,
    ).toMatch(/positive/)
  })
})

describe('driftAtFrame — interpolation between segment centres', () => {
  // Hand arithmetic on a two-segment trajectory.
  const trajectory = { frame: [500, 1500], x: [0, 10], y: [0, -4] }
  it('is linear between centres and continues the end intervals outside them', () => {
    expect(driftAtFrame(trajectory, 1000)).toEqual({ x: 5, y: -2 })
    expect(driftAtFrame(trajectory, 0)).toEqual({ x: -5, y: 2 })
    expect(driftAtFrame(trajectory, 2000)).toEqual({ x: 15, y: -6 })
  })
})
