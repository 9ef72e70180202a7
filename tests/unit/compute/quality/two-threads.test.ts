// @vitest-environment node
import { describe, expect, it } from 'vitest'
import { computeQuality, computeQualityOnTwoThreads } from '@server/compute/quality'
import { simulateLocalizations } from '@server/compute/simulate'

describe('computeQualityOnTwoThreads', () => {
  // A drifting table (seeded), so both FRCs, the drift and merging all have something to find.
  const { localizations } = simulateLocalizations({
    seed: 5,
    frames: 8_000,
    emitters: 6_000,
    drift: { linearNm: { x: 40, y: -25 } },
  })

  it('gives exactly the report one thread gives, with progress that only grows to 1', async () => {
    const oneThread = computeQuality(localizations)
    const fractions: number[] = []
    const twoThreads = await computeQualityOnTwoThreads(localizations, {}, (f) => fractions.push(f))
    expect(twoThreads.frcResolutionNm).not.toBeNull()
    expect(twoThreads.frcDriftCorrectedNm).not.toBeNull()
    expect(twoThreads.driftNm).toBeGreaterThan(30)
    expect(JSON.parse(JSON.stringify(twoThreads))).toEqual(JSON.parse(JSON.stringify(oneThread)))
    expect(fractions.at(-1)).toBe(1)
    expect(fractions.every((f, i) => i === 0 || f >= fractions[i - 1]!)).toBe(true)
  }, 120_000)
})
