import type { Localizations } from '../localizations.types'

/** Consecutive frame ranges of equal length and the segment of every usable row. */
export interface SegmentPlan {
  /** First frame of each segment (inclusive) and the frame after its last (exclusive). */
  startFrame: number[]
  endFrame: number[]
  /** Usable rows per segment. */
  rows: number[]
  /** Segment of every row, or −1 for rows left out (non-finite x, y; frame not a whole number ≥ 0). */
  segmentOf: Int32Array
  /** Bounding box of the usable rows, nm. */
  minX: number
  minY: number
  maxX: number
  maxY: number
  firstFrame: number
  lastFrame: number
  usableRows: number
}

/** Usable rows' frame range and bounding box, or null when there is no usable row. */
export function scanRows(locs: Localizations) {
  let [minX, minY, maxX, maxY] = [Infinity, Infinity, -Infinity, -Infinity]
  let [firstFrame, lastFrame, usableRows] = [Infinity, -Infinity, 0]
  for (let i = 0; i < locs.count; i++) {
    const x = locs.x[i] ?? Number.NaN
    const y = locs.y[i] ?? Number.NaN
    const f = locs.frame[i] ?? Number.NaN
    if (!usable(x, y, f)) continue
    usableRows++
    if (x < minX) minX = x
    if (x > maxX) maxX = x
    if (y < minY) minY = y
    if (y > maxY) maxY = y
    if (f < firstFrame) firstFrame = f
    if (f > lastFrame) lastFrame = f
  }
  return usableRows === 0 ? null : { minX, minY, maxX, maxY, firstFrame, lastFrame, usableRows }
}

/** Splits frames firstFrame … lastFrame into `count` equal ranges and assigns every usable row. */
export function planSegments(
  locs: Localizations,
  scan: NonNullable<ReturnType<typeof scanRows>>,
  count: number,
): SegmentPlan {
  const span = scan.lastFrame - scan.firstFrame + 1
  const startFrame: number[] = []
  const endFrame: number[] = []
  for (let k = 0; k < count; k++) {
    startFrame.push(scan.firstFrame + Math.round((k * span) / count))
    endFrame.push(scan.firstFrame + Math.round(((k + 1) * span) / count))
  }
  const rows = new Array<number>(count).fill(0)
  const segmentOf = new Int32Array(locs.count).fill(-1)
  const perFrame = count / span
  for (let i = 0; i < locs.count; i++) {
    const x = locs.x[i] ?? Number.NaN
    const y = locs.y[i] ?? Number.NaN
    const f = locs.frame[i] ?? Number.NaN
    if (!usable(x, y, f)) continue
    let k = Math.min(count - 1, Math.floor((f - scan.firstFrame) * perFrame))
    // Rounded boundaries can disagree with the estimate by one segment.
    while (k > 0 && f < (startFrame[k] ?? 0)) k--
    while (k < count - 1 && f >= (endFrame[k] ?? 0)) k++
    segmentOf[i] = k
    rows[k] = (rows[k] ?? 0) + 1
  }
  return { ...scan, startFrame, endFrame, rows, segmentOf }
}

/** Finite position and a whole frame number ≥ 0. */
function usable(x: number, y: number, frame: number): boolean {
  return Number.isFinite(x) && Number.isFinite(y) && Number.isInteger(frame) && frame >= 0
}
