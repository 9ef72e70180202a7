/** Table summary: row count, frame range, spatial bounds and z range. */
import type { Localizations, NumericColumn } from '../localizations.types'
import { countPerFrame, type FrameCounts } from './frames'
import { computed, notComputable, type StatisticResult } from './result'

export interface Extent {
  min: number
  max: number
  /** Rows whose value is NaN or ±∞ (left out of min and max). */
  nonFinite: number
}

export interface TableSummary {
  count: number
  frames: { first: number; last: number; distinct: number; invalid: number } | null
  x: Extent | null
  y: Extent | null
  z: Extent | null
}

export const SUMMARY_METHOD =
  'Exact counts and extremes over all rows; frames are 0-based indices, positions in nm'

/** Extremes of the finite values; null when there are none. Ternaries compile branch-free. */
export function extent(values: NumericColumn, count: number): Extent | null {
  let min = Infinity
  let max = -Infinity
  let nonFinite = 0
  for (let i = 0; i < count; i++) {
    const v = values[i] ?? NaN
    const finite = v - v === 0
    nonFinite += finite ? 0 : 1
    min = finite && v < min ? v : min
    max = finite && v > max ? v : max
  }
  return nonFinite === count ? null : { min, max, nonFinite }
}

/** Summary of a table; frame counts and x, y extents may be passed in when already computed. */
export function summarizeTable(
  table: Localizations,
  frameCounts?: FrameCounts | string,
  extents?: { x: Extent | null; y: Extent | null },
): StatisticResult<TableSummary> {
  const { count } = table
  const parameters = { rows: count }
  if (count === 0)
    return notComputable('The table has no localizations.', SUMMARY_METHOD, parameters)
  const perFrame = frameCounts ?? countPerFrame(table.frame, count)
  const frames =
    typeof perFrame === 'string'
      ? null
      : {
          first: perFrame.first,
          last: perFrame.last,
          distinct: perFrame.distinct,
          invalid: perFrame.invalid,
        }
  return computed(
    {
      count,
      frames,
      x: extents ? extents.x : extent(table.x, count),
      y: extents ? extents.y : extent(table.y, count),
      z: table.z ? extent(table.z, count) : null,
    },
    SUMMARY_METHOD,
    parameters,
  )
}
