/** Localizations per frame: the shared pass behind the frame summary and the per-frame curve. */
import type { NumericColumn } from '../localizations.types'

export interface FrameCounts {
  /** First and last frame holding a localization; counts[i] belongs to frame first + i. */
  first: number
  last: number
  counts: Uint32Array
  distinct: number
  /** Rows whose frame is not a number from 0 to MAX_FRAME_SPAN − 1 (left out). */
  invalid: number
}

// Frame numbers of 2²⁶ (~67 million) and above are refused: far above any acquisition
// (10⁴–10⁵ frames, DOMAIN.md §2), and they would need a large count array.
export const MAX_FRAME_SPAN = 2 ** 26

/**
 * Counts per frame in one pass: the count array grows (doubling) to the largest frame seen;
 * frames are 0-based, so it starts at frame 0 and the leading empty frames are trimmed after.
 */
function countFromZero(frame: NumericColumn, count: number) {
  let counts = new Uint32Array(1024)
  let invalid = 0
  for (let i = 0; i < count; i++) {
    const f = frame[i] ?? NaN
    if (!(f >= 0 && f < MAX_FRAME_SPAN)) {
      invalid++
      continue
    }
    const index = f | 0
    if (index >= counts.length) {
      const grown = new Uint32Array(Math.min(MAX_FRAME_SPAN, 2 ** Math.ceil(Math.log2(index + 1))))
      grown.set(counts)
      counts = grown
    }
    counts[index] = (counts[index] ?? 0) + 1
  }
  return { counts, invalid }
}

/** Counts per frame, or a reason when no row has a usable frame number. */
export function countPerFrame(frame: NumericColumn, count: number): FrameCounts | string {
  const { counts, invalid } = countFromZero(frame, count)
  if (invalid === count) {
    return `No row has a usable frame number (a number from 0 to ${MAX_FRAME_SPAN - 1}).`
  }
  let first = 0
  while ((counts[first] ?? 0) === 0) first++
  let last = counts.length - 1
  while ((counts[last] ?? 0) === 0) last--
  let distinct = 0
  for (let i = first; i <= last; i++) distinct += (counts[i] ?? 0) > 0 ? 1 : 0
  return { first, last, counts: counts.slice(first, last + 1), distinct, invalid }
}
