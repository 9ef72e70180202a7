import type { Localizations } from '../localizations.types'

/** Valid rows grouped by frame: frame k of `frames` owns rows[starts[k]] … rows[starts[k + 1] − 1]. */
export interface FrameOrder {
  /** Row indices, ascending by frame, ascending by row within a frame. */
  rows: Uint32Array
  /** Distinct frames present, ascending. */
  frames: Uint32Array
  /** Offsets into `rows`, length frames.length + 1. */
  starts: Uint32Array
  /** Rows left out: non-finite x or y, or a frame that is not a whole number ≥ 0. */
  excludedRows: number
}

/** Largest frame index we bucket with a counting sort; beyond it a comparison sort is cheaper. */
const countingSortFrameLimit = (rowCount: number) => 4 * rowCount + 65_536

/** Orders usable rows by frame in O(n + frames) (counting sort), or O(n log n) for sparse huge frame numbers. */
export function orderRowsByFrame(locs: Localizations): FrameOrder {
  let validCount = 0
  let maxFrame = 0
  for (let i = 0; i < locs.count; i++) {
    const f = usableFrame(locs, i)
    if (f < 0) continue
    validCount++
    if (f > maxFrame) maxFrame = f
  }
  const excludedRows = locs.count - validCount
  if (maxFrame > countingSortFrameLimit(validCount)) {
    const rows = new Uint32Array(validCount)
    for (let i = 0, k = 0; i < locs.count; i++) if (usableFrame(locs, i) >= 0) rows[k++] = i
    rows.sort((a, b) => (locs.frame[a] ?? 0) - (locs.frame[b] ?? 0) || a - b)
    return { ...groupSortedRows(rows, locs.frame), excludedRows }
  }
  return { ...countingSortByFrame(locs, validCount, maxFrame), excludedRows }
}

/** The row's frame if the row is usable (finite x and y, whole frame ≥ 0), else −1. */
function usableFrame(locs: Localizations, row: number): number {
  const f = locs.frame[row] ?? Number.NaN
  if (!Number.isInteger(f) || f < 0 || f > 0xfffffffe) return -1
  if (!Number.isFinite(locs.x[row] ?? Number.NaN) || !Number.isFinite(locs.y[row] ?? Number.NaN))
    return -1
  return f
}

function countingSortByFrame(
  locs: Localizations,
  validCount: number,
  maxFrame: number,
): Omit<FrameOrder, 'excludedRows'> {
  const offsets = new Uint32Array(maxFrame + 2)
  let distinct = 0
  for (let row = 0; row < locs.count; row++) {
    const f = usableFrame(locs, row)
    if (f < 0) continue
    const n = offsets[f + 1] ?? 0
    if (n === 0) distinct++
    offsets[f + 1] = n + 1
  }
  const frames = new Uint32Array(distinct)
  const starts = new Uint32Array(distinct + 1)
  let d = 0
  for (let f = 0; f <= maxFrame; f++) {
    const n = offsets[f + 1] ?? 0
    if (n > 0) {
      frames[d] = f
      starts[d + 1] = (starts[d] ?? 0) + n
      d++
    }
    offsets[f + 1] = (offsets[f] ?? 0) + n
  }
  const sorted = new Uint32Array(validCount)
  for (let row = 0; row < locs.count; row++) {
    const f = usableFrame(locs, row)
    if (f < 0) continue
    const at = offsets[f] ?? 0
    sorted[at] = row
    offsets[f] = at + 1
  }
  return { rows: sorted, frames, starts }
}

function groupSortedRows(
  rows: Uint32Array,
  frame: Localizations['frame'],
): Omit<FrameOrder, 'excludedRows'> {
  const frameList: number[] = []
  const startList: number[] = []
  let previous = -1
  for (let k = 0; k < rows.length; k++) {
    const f = frame[rows[k] ?? 0] ?? 0
    if (f !== previous) {
      frameList.push(f)
      startList.push(k)
      previous = f
    }
  }
  startList.push(rows.length)
  return { rows, frames: Uint32Array.from(frameList), starts: Uint32Array.from(startList) }
}
