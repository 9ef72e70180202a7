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
  const { x, y, frame } = locs
  const valid = new Uint32Array(locs.count)
  let validCount = 0
  let maxFrame = 0
  for (let i = 0; i < locs.count; i++) {
    const f = frame[i] ?? Number.NaN
    const xi = x[i] ?? Number.NaN
    const yi = y[i] ?? Number.NaN
    if (!Number.isInteger(f) || f < 0 || f > 0xfffffffe) continue
    if (!Number.isFinite(xi) || !Number.isFinite(yi)) continue
    valid[validCount++] = i
    if (f > maxFrame) maxFrame = f
  }
  const rows = valid.subarray(0, validCount)
  const excludedRows = locs.count - validCount
  if (maxFrame > countingSortFrameLimit(validCount)) {
    rows.sort((a, b) => (frame[a] ?? 0) - (frame[b] ?? 0) || a - b)
    return { ...groupSortedRows(rows, frame), excludedRows }
  }
  return { ...countingSortByFrame(rows, frame, maxFrame), excludedRows }
}

function countingSortByFrame(
  rows: Uint32Array,
  frame: Localizations['frame'],
  maxFrame: number,
): Omit<FrameOrder, 'excludedRows'> {
  const offsets = new Uint32Array(maxFrame + 2)
  let distinct = 0
  for (let k = 0; k < rows.length; k++) {
    const f = frame[rows[k] ?? 0] ?? 0
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
  const sorted = new Uint32Array(rows.length)
  for (let k = 0; k < rows.length; k++) {
    const row = rows[k] ?? 0
    const f = frame[row] ?? 0
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
