/** Localizations per frame: the shared pass behind the frame summary and the per-frame curve. */
import type { NumericColumn } from '../localizations.types'

export interface FrameCounts {
  /** First and last frame holding a localization; counts[i] belongs to frame first + i. */
  first: number
  last: number
  counts: Uint32Array
  distinct: number
  /** Rows whose frame is not a finite number ≥ 0 (left out). */
  invalid: number
}

// 2²⁶ frames (~67 million) is far above any acquisition (10⁴–10⁵ frames, DOMAIN.md §2).
export const MAX_FRAME_SPAN = 2 ** 26

function frameRange(frame: NumericColumn, count: number) {
  let first = Infinity
  let last = -Infinity
  let invalid = 0
  for (let i = 0; i < count; i++) {
    const f = frame[i] ?? NaN
    const valid = f >= 0 && f - f === 0
    invalid += valid ? 0 : 1
    first = valid && f < first ? f : first
    last = valid && f > last ? f : last
  }
  return { first: Math.floor(first), last: Math.floor(last), invalid }
}

/** Counts per frame, or a reason when there are none or the frames span too many numbers. */
export function countPerFrame(frame: NumericColumn, count: number): FrameCounts | string {
  const { first, last, invalid } = frameRange(frame, count)
  if (invalid === count) return 'No row has a valid frame number (a finite number ≥ 0).'
  if (last - first + 1 > MAX_FRAME_SPAN) {
    return `Frame numbers span ${last - first + 1} frames, more than ${MAX_FRAME_SPAN}.`
  }
  const counts = new Uint32Array(last - first + 1)
  for (let i = 0; i < count; i++) {
    const f = frame[i] ?? NaN
    if (f >= 0 && f - f === 0) {
      const index = Math.floor(f) - first
      counts[index] = (counts[index] ?? 0) + 1
    }
  }
  let distinct = 0
  for (let i = 0; i < counts.length; i++) distinct += (counts[i] ?? 0) > 0 ? 1 : 0
  return { first, last, counts, distinct, invalid }
}
