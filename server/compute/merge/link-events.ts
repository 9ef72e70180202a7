import type { Localizations } from '../localizations.types'
import { CellBuckets } from './cell-buckets'
import type { FrameOrder } from './frame-order'

/** Event id given to rows that were left out (non-finite position, bad frame). */
export const NO_EVENT = 0xffffffff

/** Per-event running state; arrays are indexed by event id and grow on demand. */
export interface EventTable {
  count: number
  eventOf: Uint32Array
  /** Weighted mean position (the merged position once linking ends). */
  meanX: Float64Array
  meanY: Float64Array
  weight: Float64Array
  photons: Float64Array
  firstFrame: Uint32Array
  lastFrame: Uint32Array
  localizations: Uint32Array
}

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
 * that finds no event starts one. Open events are re-bucketed once per frame, and an event stays open
 * for maxDarkFrames + 1 frames, so the whole pass is O(n · (maxDarkFrames + 1)).
 */
export function linkEvents(locs: Localizations, order: FrameOrder, rules: LinkRules): EventTable {
  const table = createEventTable(locs.count, Math.max(16, order.rows.length >>> 2))
  const buckets = new CellBuckets()
  let open = new Uint32Array(1024)
  let openCount = 0
  const radiusSquared = rules.radiusNm * rules.radiusNm
  for (let k = 0; k < order.frames.length; k++) {
    const frame = order.frames[k] ?? 0
    openCount = dropExpired(open, openCount, table.lastFrame, frame - rules.maxDarkFrames - 1)
    buckets.build(open, openCount, table.meanX, table.meanY, rules.radiusNm)
    const firstNew = table.count
    for (let at = order.starts[k] ?? 0; at < (order.starts[k + 1] ?? 0); at++) {
      const row = order.rows[at] ?? 0
      const x = locs.x[row] ?? 0
      const y = locs.y[row] ?? 0
      const event = nearestOpenEvent(buckets, table, x, y, frame, radiusSquared)
      if (event === NO_EVENT) addEvent(table, row, x, y, frame, locs, rules.weights)
      else extendEvent(table, event, row, x, y, frame, locs, rules.weights)
    }
    const needed = openCount + table.count - firstNew
    if (needed > open.length) open = grow(open, needed)
    for (let event = firstNew; event < table.count; event++) open[openCount++] = event
  }
  return table
}

function nearestOpenEvent(
  buckets: CellBuckets,
  table: EventTable,
  x: number,
  y: number,
  frame: number,
  radiusSquared: number,
): number {
  const cellX = buckets.cellOf(x)
  const cellY = buckets.cellOf(y)
  let best = NO_EVENT
  let bestDistance = radiusSquared
  for (let dy = -1; dy <= 1; dy++) {
    for (let dx = -1; dx <= 1; dx++) {
      const bucket = buckets.bucketOfCell(cellX + dx, cellY + dy)
      for (let m = buckets.start(bucket); m < buckets.end(bucket); m++) {
        const event = buckets.memberAt(m)
        if ((table.lastFrame[event] ?? 0) === frame) continue
        const ex = (table.meanX[event] ?? 0) - x
        const ey = (table.meanY[event] ?? 0) - y
        const distance = ex * ex + ey * ey
        if (distance < bestDistance || (distance === bestDistance && event < best)) {
          best = event
          bestDistance = distance
        }
      }
    }
  }
  return best
}

/** Keeps, in order, the open events last seen at or after `oldestFrame`. */
function dropExpired(
  open: Uint32Array,
  count: number,
  lastFrame: Uint32Array,
  oldestFrame: number,
) {
  let kept = 0
  for (let k = 0; k < count; k++) {
    const event = open[k] ?? 0
    if ((lastFrame[event] ?? 0) >= oldestFrame) open[kept++] = event
  }
  return kept
}

function rowWeight(row: number, weights: LinkRules['weights']): number {
  return weights ? (weights[row] ?? 1) : 1
}

function addEvent(
  table: EventTable,
  row: number,
  x: number,
  y: number,
  frame: number,
  locs: Localizations,
  weights: LinkRules['weights'],
) {
  if (table.count === table.meanX.length) growEventTable(table)
  const event = table.count++
  table.eventOf[row] = event
  table.meanX[event] = x
  table.meanY[event] = y
  table.weight[event] = rowWeight(row, weights)
  table.photons[event] = photonsOf(locs, row)
  table.firstFrame[event] = frame
  table.lastFrame[event] = frame
  table.localizations[event] = 1
}

function extendEvent(
  table: EventTable,
  event: number,
  row: number,
  x: number,
  y: number,
  frame: number,
  locs: Localizations,
  weights: LinkRules['weights'],
) {
  const w = rowWeight(row, weights)
  const total = (table.weight[event] ?? 0) + w
  const share = w / total
  table.eventOf[row] = event
  table.meanX[event] = (table.meanX[event] ?? 0) + share * (x - (table.meanX[event] ?? 0))
  table.meanY[event] = (table.meanY[event] ?? 0) + share * (y - (table.meanY[event] ?? 0))
  table.weight[event] = total
  table.photons[event] = (table.photons[event] ?? 0) + photonsOf(locs, row)
  table.lastFrame[event] = frame
  table.localizations[event] = (table.localizations[event] ?? 0) + 1
}

/** Photons of a row for the event sum; missing or unusable values count as 0. */
function photonsOf(locs: Localizations, row: number): number {
  const p = locs.photons?.[row] ?? 0
  return Number.isFinite(p) && p > 0 ? p : 0
}

function createEventTable(rowCount: number, capacity: number): EventTable {
  const eventOf = new Uint32Array(rowCount).fill(NO_EVENT)
  return {
    count: 0,
    eventOf,
    meanX: new Float64Array(capacity),
    meanY: new Float64Array(capacity),
    weight: new Float64Array(capacity),
    photons: new Float64Array(capacity),
    firstFrame: new Uint32Array(capacity),
    lastFrame: new Uint32Array(capacity),
    localizations: new Uint32Array(capacity),
  }
}

function growEventTable(table: EventTable) {
  const size = table.meanX.length * 2
  table.meanX = grow(table.meanX, size)
  table.meanY = grow(table.meanY, size)
  table.weight = grow(table.weight, size)
  table.photons = grow(table.photons, size)
  table.firstFrame = grow(table.firstFrame, size)
  table.lastFrame = grow(table.lastFrame, size)
  table.localizations = grow(table.localizations, size)
}

function grow<T extends Float64Array | Uint32Array>(array: T, atLeast: number): T {
  const bigger = new (array.constructor as new (length: number) => T)(
    Math.max(atLeast, array.length * 2),
  )
  bigger.set(array)
  return bigger
}
