import type { Localizations } from '../localizations.types'
import type { FrameOrder } from './frame-order'

/** One row per event, indexed by event id. */
export interface MergedEvents {
  /** Photon-weighted mean position, nm (equal weights when photons are missing or unusable). */
  x: Float64Array
  y: Float64Array
  /** Sum of the rows' photons (0 when the table has no photons column). */
  photons: Float64Array
  firstFrame: Uint32Array
  lastFrame: Uint32Array
  localizations: Uint32Array
}

/**
 * Sums each event's rows into exactly sized columns. Rows come in frame order, so the first row of an
 * event gives its first frame and the last its last frame.
 */
export function aggregateEvents(
  locs: Localizations,
  order: FrameOrder,
  eventOf: Uint32Array,
  events: number,
  weights: Localizations['photons'] | null,
): MergedEvents {
  const merged: MergedEvents = {
    x: new Float64Array(events),
    y: new Float64Array(events),
    photons: new Float64Array(events),
    firstFrame: new Uint32Array(events),
    lastFrame: new Uint32Array(events),
    localizations: new Uint32Array(events),
  }
  const totalWeight = new Float64Array(events)
  const { rows } = order
  for (let k = 0; k < rows.length; k++) {
    const row = rows[k] ?? 0
    const event = eventOf[row] ?? 0
    const weight = weights ? (weights[row] ?? 1) : 1
    const frame = locs.frame[row] ?? 0
    const seen = merged.localizations[event] ?? 0
    if (seen === 0) merged.firstFrame[event] = frame
    merged.lastFrame[event] = frame
    merged.localizations[event] = seen + 1
    merged.x[event] = (merged.x[event] ?? 0) + weight * (locs.x[row] ?? 0)
    merged.y[event] = (merged.y[event] ?? 0) + weight * (locs.y[row] ?? 0)
    merged.photons[event] = (merged.photons[event] ?? 0) + usablePhotons(locs.photons?.[row])
    totalWeight[event] = (totalWeight[event] ?? 0) + weight
  }
  for (let event = 0; event < events; event++) {
    merged.x[event] = (merged.x[event] ?? 0) / (totalWeight[event] ?? 1)
    merged.y[event] = (merged.y[event] ?? 0) / (totalWeight[event] ?? 1)
  }
  return merged
}

/** Photons of a row for the event sum; missing or unusable values count as 0. */
function usablePhotons(value: number | undefined): number {
  return value !== undefined && Number.isFinite(value) && value > 0 ? value : 0
}
