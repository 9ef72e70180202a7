import type { Localizations } from '../localizations.types'
import { CellBuckets } from './cell-buckets'
import type { FrameOrder } from './frame-order'
import { OpenEvents } from './open-events'

/** Event id given to rows that were left out (non-finite position, bad frame). */
export const NO_EVENT = 0xffffffff

export interface LinkRules {
  radiusNm: number
  maxDarkFrames: number
  /** Per-row weight of the mean position (photons), or null for equal weights. */
  weights: Localizations['photons'] | null
}

/**
 * Links rows frame by frame: a row joins the nearest open event whose mean lies within the radius
 * and that was last seen at most maxDarkFrames dark frames ago; an event takes at most one row per
 * frame (one molecule gives one spot per frame); rows of a frame are handled in row order and a row
 * that finds no event starts one. Open events are re-bucketed once per frame and stay open for
 * maxDarkFrames + 1 frames, so the pass is O(n · (maxDarkFrames + 1)); only open events keep state.
 */
export function linkEvents(locs: Localizations, order: FrameOrder, rules: LinkRules) {
  const eventOf = new Uint32Array(locs.count).fill(NO_EVENT)
  const open = new OpenEvents()
  const buckets = new CellBuckets()
  const radiusSquared = rules.radiusNm * rules.radiusNm
  let events = 0
  for (let k = 0; k < order.frames.length; k++) {
    const frame = order.frames[k] ?? 0
    open.closeLastSeenBefore(frame - rules.maxDarkFrames - 1)
    buckets.build(open.slots, open.count, open.meanX, open.meanY, rules.radiusNm)
    const end = order.starts[k + 1] ?? 0
    for (let at = order.starts[k] ?? 0; at < end; at++) {
      const row = order.rows[at] ?? 0
      const x = locs.x[row] ?? 0
      const y = locs.y[row] ?? 0
      const weight = rules.weights ? (rules.weights[row] ?? 1) : 1
      const slot = nearestOpenSlot(buckets, open, x, y, frame, radiusSquared)
      if (slot < 0) eventOf[row] = open.start(events++, x, y, weight, frame)
      else eventOf[row] = open.extend(slot, x, y, weight, frame)
    }
    open.admitStarted()
  }
  return { eventOf, events }
}

/** Slot of the nearest event within the radius not yet extended in this frame (ties: oldest), or −1. */
function nearestOpenSlot(
  buckets: CellBuckets,
  open: OpenEvents,
  x: number,
  y: number,
  frame: number,
  radiusSquared: number,
): number {
  buckets.findNearBuckets(x, y)
  let best = -1
  let bestEvent = NO_EVENT
  let bestDistance = radiusSquared
  for (let q = 0; q < 4; q++) {
    const bucket = buckets.nearBuckets[q] ?? 0
    const end = buckets.end(bucket)
    for (let m = buckets.start(bucket); m < end; m++) {
      const slot = buckets.memberAt(m)
      if ((open.lastFrame[slot] ?? 0) === frame) continue
      const ex = (open.meanX[slot] ?? 0) - x
      const ey = (open.meanY[slot] ?? 0) - y
      const distance = ex * ex + ey * ey
      const event = open.eventOfSlot[slot] ?? 0
      if (distance < bestDistance || (distance === bestDistance && event < bestEvent)) {
        best = slot
        bestEvent = event
        bestDistance = distance
      }
    }
  }
  return best
}
