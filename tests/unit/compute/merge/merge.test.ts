// @vitest-environment node
import { describe, expect, it } from 'vitest'
import { mergeLocalizations, NO_EVENT } from '@server/compute/merge'
import type { Localizations } from '@server/compute/localizations.types'

function table(
  rows: Array<[x: number, y: number, frame: number, photons?: number]>,
): Localizations {
  return {
    count: rows.length,
    x: Float64Array.from(rows, (r) => r[0]),
    y: Float64Array.from(rows, (r) => r[1]),
    frame: Float64Array.from(rows, (r) => r[2]),
    photons: Float64Array.from(rows, (r) => r[3] ?? 1000),
  }
}

describe('mergeLocalizations — DOMAIN §1.8 deterministic case', () => {
  // DOMAIN.md §1.8 [P]: on in frames 10–12, off 13–14, on 15, all within 5 nm: g = 2 → 1 event,
  // g = 1 → 2 events; a second emitter 100 nm away never merges with r = 30.
  const emitter: Array<[number, number, number]> = [
    [1000, 1000, 10],
    [1003, 998, 11],
    [998, 1004, 12],
    [1002, 1001, 15],
  ]
  const neighbour: Array<[number, number, number]> = [10, 11, 12, 13, 14, 15].map((f) => [
    1100,
    1000 + (f % 2),
    f,
  ])
  const locs = table([...emitter, ...neighbour])

  it('joins across two dark frames when g = 2', () => {
    const result = mergeLocalizations(locs, { radiusNm: 30, maxDarkFrames: 2 })
    expect(result.events).toBe(2)
    const ids = Array.from(result.eventOf.subarray(0, 4))
    expect(new Set(ids).size).toBe(1)
    expect(result.merged.firstFrame[ids[0] ?? 0]).toBe(10)
    expect(result.merged.lastFrame[ids[0] ?? 0]).toBe(15)
  })

  it('splits at two dark frames when g = 1', () => {
    const result = mergeLocalizations(locs, { radiusNm: 30, maxDarkFrames: 1 })
    expect(result.events).toBe(3)
    const ids = Array.from(result.eventOf.subarray(0, 4))
    expect(ids[0]).toBe(ids[2])
    expect(ids[3]).not.toBe(ids[0])
  })

  it('never merges the emitter 100 nm away', () => {
    for (const maxDarkFrames of [0, 1, 2, 5]) {
      const result = mergeLocalizations(locs, { radiusNm: 30, maxDarkFrames })
      const emitterIds = new Set(result.eventOf.subarray(0, 4))
      for (const id of result.eventOf.subarray(4)) expect(emitterIds.has(id)).toBe(false)
    }
  })

  it('weights the merged position by photons and sums photons', () => {
    // Hand arithmetic: (0·100 + 10·300) / 400 = 7.5 nm.
    const result = mergeLocalizations(
      table([
        [0, 0, 0, 100],
        [10, 0, 1, 300],
      ]),
      { radiusNm: 30 },
    )
    expect(result.events).toBe(1)
    expect(result.merged.x[0]).toBeCloseTo(7.5, 12)
    expect(result.merged.photons[0]).toBe(400)
    expect(result.onTimeFrames.counts).toEqual([0, 1])
    expect(result.localizationsPerEvent.mean).toBe(2)
  })
})

describe('mergeLocalizations — bad input', () => {
  it('leaves out rows with NaN positions or broken frames and says why when nothing is left', () => {
    const locs = table([
      [Number.NaN, 0, 0],
      [0, 0, -1],
      [0, 0, 1.5],
    ])
    const result = mergeLocalizations(locs)
    expect(result.events).toBe(0)
    expect(result.parameters.excludedRows).toBe(3)
    expect(Array.from(result.eventOf)).toEqual([NO_EVENT, NO_EVENT, NO_EVENT])
    expect(result.reason).toMatch(/no localization/)
  })

  it('refuses a non-positive radius with a reason instead of throwing', () => {
    const result = mergeLocalizations(table([[0, 0, 0]]), { radiusNm: 0 })
    expect(result.events).toBe(0)
    expect(result.reason).toMatch(/radius/)
  })

  it('refuses a negative or NaN dark-frame allowance with a reason', () => {
    for (const maxDarkFrames of [-1, Number.NaN]) {
      const result = mergeLocalizations(table([[0, 0, 0]]), { maxDarkFrames })
      expect(result.events).toBe(0)
      expect(result.reason).toMatch(/dark-frame/)
    }
  })

  it('uses equal weights when a photon count is zero', () => {
    const result = mergeLocalizations(
      table([
        [0, 0, 0, 0],
        [10, 0, 1, 300],
      ]),
      { radiusNm: 30 },
    )
    expect(result.parameters.weighting).toBe('equal')
    expect(result.merged.x[0]).toBeCloseTo(5, 12)
  })

  it('defaults the radius to 2.5 × the median uncertainty, else 30 nm (documented defaults)', () => {
    const locs = { ...table([[0, 0, 0]]), uncertainty: Float64Array.of(12) }
    expect(mergeLocalizations(locs).parameters.radiusNm).toBe(30)
    expect(
      mergeLocalizations({ ...locs, uncertainty: Float64Array.of(8) }).parameters.radiusNm,
    ).toBe(20)
    expect(mergeLocalizations(table([[0, 0, 0]])).parameters.radiusNm).toBe(30)
  })
})
