import type { MergedEvents } from './aggregate-events'

/** Histogram of a whole-number quantity: counts[k] holds values in [edges[k], edges[k + 1]). */
export interface IntegerHistogram {
  edges: number[]
  counts: number[]
  /** Values at or above the last edge, left out of `counts`. */
  overflow: number
  mean: number | null
  median: number | null
}

/** Bins of width 1 from 1 up to this many; longer values go to `overflow`. */
export const HISTOGRAM_MAX_VALUE = 100

/** Histogram of per-event values ≥ 1 with unit bins; mean and median use every value. */
export function integerHistogram(count: number, valueOf: (event: number) => number) {
  const tally = new Float64Array(HISTOGRAM_MAX_VALUE + 1)
  let overflow = 0
  let sum = 0
  let largest = 0
  for (let event = 0; event < count; event++) {
    const value = valueOf(event)
    sum += value
    if (value > largest) largest = value
    if (value <= HISTOGRAM_MAX_VALUE) tally[value] = (tally[value] ?? 0) + 1
    else overflow++
  }
  const top = Math.min(largest, HISTOGRAM_MAX_VALUE)
  const edges: number[] = []
  const counts: number[] = []
  for (let value = 1; value <= top; value++) {
    edges.push(value)
    counts.push(tally[value] ?? 0)
  }
  edges.push(top + 1)
  const histogram: IntegerHistogram = {
    edges,
    counts,
    overflow,
    mean: count > 0 ? sum / count : null,
    median: count > 0 ? medianFromTally(tally, count, largest, valueOf) : null,
  }
  return histogram
}

function medianFromTally(
  tally: Float64Array,
  count: number,
  largest: number,
  valueOf: (event: number) => number,
): number {
  const lowerRank = Math.floor((count - 1) / 2)
  const upperRank = Math.floor(count / 2)
  return (
    (valueAtRank(tally, lowerRank, largest, count, valueOf) +
      valueAtRank(tally, upperRank, largest, count, valueOf)) /
    2
  )
}

/** Value of the given 0-based rank among all values; overflow ranks are resolved by sorting them. */
function valueAtRank(
  tally: Float64Array,
  rank: number,
  largest: number,
  count: number,
  valueOf: (event: number) => number,
): number {
  let seen = 0
  for (let value = 0; value <= Math.min(largest, HISTOGRAM_MAX_VALUE); value++) {
    seen += tally[value] ?? 0
    if (seen > rank) return value
  }
  const overflowValues: number[] = []
  for (let event = 0; event < count; event++) {
    const value = valueOf(event)
    if (value > HISTOGRAM_MAX_VALUE) overflowValues.push(value)
  }
  overflowValues.sort((a, b) => a - b)
  return overflowValues[rank - seen] ?? largest
}

/** On-time in frames from first to last sighting, dark frames inside the event included. */
export function onTimeHistogram(merged: MergedEvents): IntegerHistogram {
  return integerHistogram(
    merged.x.length,
    (event) => (merged.lastFrame[event] ?? 0) - (merged.firstFrame[event] ?? 0) + 1,
  )
}

export function localizationsPerEventHistogram(merged: MergedEvents): IntegerHistogram {
  return integerHistogram(merged.x.length, (event) => merged.localizations[event] ?? 0)
}
