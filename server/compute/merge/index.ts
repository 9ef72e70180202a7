import type { Localizations } from '../localizations.types'
import { orderRowsByFrame, type FrameOrder } from './frame-order'
import { aggregateEvents, type MergedEvents } from './aggregate-events'
import { linkEvents, NO_EVENT } from './link-events'
import { localizationsPerEventHistogram, onTimeHistogram, type IntegerHistogram } from './summaries'

export { CellBuckets } from './cell-buckets'
export { orderRowsByFrame, type FrameOrder } from './frame-order'
export { NO_EVENT } from './link-events'
export type { IntegerHistogram } from './summaries'
export type { MergedEvents } from './aggregate-events'

export interface MergeOptions {
  /** Link radius, nm. Default: 2.5 × the median `uncertainty` when that column is usable, else 30. */
  radiusNm?: number
  /** Frames an event may stay dark and still be continued (0 = only consecutive frames). Default 1. */
  maxDarkFrames?: number
}

export interface MergeResult {
  events: number
  /** Event id of every input row; NO_EVENT for rows left out. */
  eventOf: Uint32Array
  onTimeFrames: IntegerHistogram
  localizationsPerEvent: IntegerHistogram
  merged: MergedEvents
  method: string
  parameters: {
    radiusNm: number
    radiusSource: 'given' | 'median uncertainty × 2.5' | 'fixed default'
    maxDarkFrames: number
    weighting: 'photons' | 'equal'
    excludedRows: number
  }
  reason?: string
}

export const MERGE_METHOD =
  'Frame-by-frame linking: a localization joins the nearest open event whose photon-weighted mean ' +
  'lies within the radius and that was last seen at most maxDarkFrames dark frames before; one ' +
  'localization per event per frame; merged position = photon-weighted mean, photons summed.'

const DEFAULT_RADIUS_NM = 30
const RADIUS_PER_PRECISION = 2.5
const DEFAULT_MAX_DARK_FRAMES = 1

/** Merges repeated localizations of one molecule into events (DOMAIN §1.8). */
export function mergeLocalizations(locs: Localizations, options: MergeOptions = {}): MergeResult {
  const radius = chooseRadius(locs, options.radiusNm)
  const maxDarkFrames = Math.floor(options.maxDarkFrames ?? DEFAULT_MAX_DARK_FRAMES)
  const order = orderRowsByFrame(locs)
  const weights = usablePhotons(locs) ? (locs.photons ?? null) : null
  const parameters: MergeResult['parameters'] = {
    radiusNm: radius.value,
    radiusSource: radius.source,
    maxDarkFrames,
    weighting: weights ? 'photons' : 'equal',
    excludedRows: order.excludedRows,
  }
  const invalid = !(radius.value > 0 && Number.isFinite(radius.value))
    ? 'the link radius must be a finite number of nm above 0'
    : !(maxDarkFrames >= 0 && Number.isFinite(maxDarkFrames))
      ? 'the dark-frame allowance must be a whole number ≥ 0'
      : null
  if (invalid) {
    const nothing = {
      rows: new Uint32Array(0),
      frames: new Uint32Array(0),
      starts: new Uint32Array(1),
    }
    return summarize(locs, { ...nothing, excludedRows: locs.count }, parameters, {
      eventOf: new Uint32Array(locs.count).fill(NO_EVENT),
      events: 0,
      reason: invalid,
    })
  }
  const { eventOf, events } = linkEvents(locs, order, {
    radiusNm: radius.value,
    maxDarkFrames,
    weights,
  })
  const reason =
    events === 0 ? 'no localization has a finite x, y and a whole frame ≥ 0' : undefined
  return summarize(locs, order, parameters, { eventOf, events, reason })
}

function summarize(
  locs: Localizations,
  order: FrameOrder,
  parameters: MergeResult['parameters'],
  linked: { eventOf: Uint32Array; events: number; reason: string | undefined },
): MergeResult {
  const weights = parameters.weighting === 'photons' ? (locs.photons ?? null) : null
  const merged = aggregateEvents(locs, order, linked.eventOf, linked.events, weights)
  return {
    events: linked.events,
    eventOf: linked.eventOf,
    onTimeFrames: onTimeHistogram(merged),
    localizationsPerEvent: localizationsPerEventHistogram(merged),
    merged,
    method: MERGE_METHOD,
    parameters,
    ...(linked.reason ? { reason: linked.reason } : {}),
  }
}

function chooseRadius(locs: Localizations, given: number | undefined) {
  if (given !== undefined) return { value: given, source: 'given' as const }
  const median = sampledMedian(locs.uncertainty, locs.count)
  if (median !== null)
    return { value: RADIUS_PER_PRECISION * median, source: 'median uncertainty × 2.5' as const }
  return { value: DEFAULT_RADIUS_NM, source: 'fixed default' as const }
}

/** Median of the finite positive values among at most ~65 000 evenly spaced rows; null if none. */
function sampledMedian(column: Localizations['uncertainty'], count: number): number | null {
  if (!column || count === 0) return null
  const stride = Math.max(1, Math.floor(count / 65_536))
  const sample: number[] = []
  for (let i = 0; i < count; i += stride) {
    const value = column[i] ?? Number.NaN
    if (Number.isFinite(value) && value > 0) sample.push(value)
  }
  if (sample.length === 0) return null
  sample.sort((a, b) => a - b)
  const middle = sample.length >>> 1
  return sample.length % 2
    ? (sample[middle] ?? 0)
    : ((sample[middle - 1] ?? 0) + (sample[middle] ?? 0)) / 2
}

/** Photon weights are used only when every row has a finite, positive photon count. */
function usablePhotons(locs: Localizations): boolean {
  const photons = locs.photons
  if (!photons) return false
  for (let i = 0; i < locs.count; i++) {
    const p = photons[i] ?? Number.NaN
    if (!(p > 0) || !Number.isFinite(p)) return false
  }
  return true
}
