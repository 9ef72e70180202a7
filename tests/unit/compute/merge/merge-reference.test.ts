// @vitest-environment node
import { describe, expect, it } from 'vitest'
import { mergeLocalizations } from '@server/compute/merge'
import type { Localizations } from '@server/compute/localizations.types'
import { createRandom } from '../../../fixtures/spot-simulation'

/**
 * Brute-force O(n²) statement of the linking rule of DOMAIN §1.8 (common practice): rows in frame
 * order (row order within a frame); each row joins the nearest event (ties: oldest) whose weighted mean
 * is within r, last seen 1 … g + 1 frames earlier; otherwise it starts an event.
 */
function bruteForceEvents(locs: Localizations, r: number, g: number): number[] {
  const rows = Array.from({ length: locs.count }, (_, i) => i)
  rows.sort((a, b) => (locs.frame[a] ?? 0) - (locs.frame[b] ?? 0) || a - b)
  const events: Array<{ x: number; y: number; w: number; last: number }> = []
  const eventOf = new Array<number>(locs.count).fill(-1)
  for (const row of rows) {
    const [x, y, f, w] = [
      locs.x[row] ?? 0,
      locs.y[row] ?? 0,
      locs.frame[row] ?? 0,
      locs.photons?.[row] ?? 1,
    ]
    let best = -1
    let bestDistance = Infinity
    events.forEach((event, id) => {
      const distance = Math.hypot(event.x - x, event.y - y)
      const gap = f - event.last
      if (gap >= 1 && gap <= g + 1 && distance <= r && distance < bestDistance) {
        best = id
        bestDistance = distance
      }
    })
    if (best < 0) {
      eventOf[row] = events.length
      events.push({ x, y, w, last: f })
      continue
    }
    const event = events[best]!
    event.x = (event.x * event.w + x * w) / (event.w + w)
    event.y = (event.y * event.w + y * w) / (event.w + w)
    event.w += w
    event.last = f
    eventOf[row] = best
  }
  return eventOf
}

/** Relabels a partition by order of first appearance, so two labelings of one partition compare equal. */
function canonical(labels: ArrayLike<number>): number[] {
  const seen = new Map<number, number>()
  return Array.from(labels, (label) => {
    if (!seen.has(label)) seen.set(label, seen.size)
    return seen.get(label)!
  })
}

/** Emitters blinking at random in a small field, so that bursts, gaps and near neighbours all occur. */
function randomBlinks(
  seed: number,
  emitters: number,
  frames: number,
  field: number,
): Localizations {
  const random = createRandom(seed)
  const x: number[] = []
  const y: number[] = []
  const frame: number[] = []
  const photons: number[] = []
  for (let e = 0; e < emitters; e++) {
    const [ex, ey] = [random() * field, random() * field]
    for (let f = 0; f < frames; f++) {
      if (random() > 0.3) continue
      x.push(ex + (random() - 0.5) * 30)
      y.push(ey + (random() - 0.5) * 30)
      frame.push(f)
      photons.push(200 + random() * 3000)
    }
  }
  return {
    count: x.length,
    x: Float64Array.from(x),
    y: Float64Array.from(y),
    frame: Uint32Array.from(frame),
    photons: Float32Array.from(photons),
  }
}

describe('mergeLocalizations against a brute-force O(n²) reference', () => {
  const cases = [
    { seed: 1, r: 30, g: 0, field: 400 },
    { seed: 2, r: 30, g: 1, field: 400 },
    { seed: 3, r: 40, g: 2, field: 300 },
    { seed: 4, r: 25, g: 3, field: 600 },
    { seed: 5, r: 60, g: 1, field: 250 },
  ]
  for (const { seed, r, g, field } of cases) {
    it(`gives the same partition (seed ${seed}, r ${r}, g ${g})`, () => {
      const locs = randomBlinks(seed, 40, 30, field)
      const result = mergeLocalizations(locs, { radiusNm: r, maxDarkFrames: g })
      const expected = bruteForceEvents(locs, r, g)
      expect(result.events).toBe(new Set(expected).size)
      expect(result.events).toBeLessThan(locs.count)
      expect(canonical(result.eventOf)).toEqual(canonical(expected))
    })
  }
})
