import type { Localizations } from '../localizations.types'

/** Drift at segment centres, nm, relative to the acquisition's first frame (drift there is 0). */
export interface DriftTrajectory {
  /** Segment centre frames, ascending. */
  frame: number[]
  x: number[]
  y: number[]
}

/** Drift of every frame firstFrame … firstFrame + x.length − 1. */
export interface DenseDrift {
  firstFrame: number
  x: Float32Array
  y: Float32Array
}

/**
 * Drift at one frame: linear between segment centres, extended along the first and last
 * intervals before the first and after the last centre (a constant with a single point).
 */
export function driftAtFrame(trajectory: DriftTrajectory, frame: number): { x: number; y: number } {
  const { frame: centres, x, y } = trajectory
  const last = centres.length - 1
  if (last < 1) return { x: x[0] ?? 0, y: y[0] ?? 0 }
  let low = 0
  let high = last
  while (high - low > 1) {
    const middle = (low + high) >>> 1
    if ((centres[middle] ?? 0) <= frame) low = middle
    else high = middle
  }
  if (frame >= (centres[last] ?? 0)) [low, high] = [last - 1, last]
  const [f0, f1] = [centres[low] ?? 0, centres[high] ?? 1]
  const t = (frame - f0) / (f1 - f0)
  return {
    x: (x[low] ?? 0) + t * ((x[high] ?? 0) - (x[low] ?? 0)),
    y: (y[low] ?? 0) + t * ((y[high] ?? 0) - (y[low] ?? 0)),
  }
}

/** Trajectory from per-segment drift, shifted so the drift at `firstFrame` is zero. */
export function trajectoryFrom(
  centres: number[],
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  firstFrame: number,
): DriftTrajectory {
  const raw = { frame: centres, x: Array.from(x), y: Array.from(y) }
  const origin = driftAtFrame(raw, firstFrame)
  return { frame: centres, x: raw.x.map((v) => v - origin.x), y: raw.y.map((v) => v - origin.y) }
}

export function denseDrift(
  trajectory: DriftTrajectory,
  firstFrame: number,
  lastFrame: number,
): DenseDrift {
  const frames = Math.max(0, lastFrame - firstFrame + 1)
  const dense = { firstFrame, x: new Float32Array(frames), y: new Float32Array(frames) }
  for (let k = 0; k < frames; k++) {
    const at = driftAtFrame(trajectory, firstFrame + k)
    dense.x[k] = at.x
    dense.y[k] = at.y
  }
  return dense
}

/** Largest distance of the drift from its value at the first frame, nm, over the dense frames. */
export function maxDisplacementNm(dense: DenseDrift): number {
  let largest = 0
  for (let k = 0; k < dense.x.length; k++) {
    largest = Math.max(largest, Math.hypot(dense.x[k] ?? 0, dense.y[k] ?? 0))
  }
  return largest
}

/** Length of the path through the segment centres, nm. */
export function pathLengthNm(trajectory: DriftTrajectory): number {
  let length = 0
  for (let k = 1; k < trajectory.frame.length; k++) {
    length += Math.hypot(
      (trajectory.x[k] ?? 0) - (trajectory.x[k - 1] ?? 0),
      (trajectory.y[k] ?? 0) - (trajectory.y[k - 1] ?? 0),
    )
  }
  return length
}

/**
 * Positions with the drift removed: x − d_x(frame), y − d_y(frame). Rows with a non-finite frame
 * keep their position. Frames are looked up in a dense table over the table's frame range.
 */
export function applyDriftCorrection(
  locs: Localizations,
  trajectory: DriftTrajectory,
): { x: Float64Array; y: Float64Array } {
  let [first, last] = [Infinity, -Infinity]
  for (let i = 0; i < locs.count; i++) {
    const f = locs.frame[i] ?? Number.NaN
    if (f < first) first = f
    if (f > last) last = f
  }
  const x = new Float64Array(locs.count)
  const y = new Float64Array(locs.count)
  x.set(locs.x.subarray(0, locs.count))
  y.set(locs.y.subarray(0, locs.count))
  if (!(last >= first) || trajectory.frame.length === 0) return { x, y }
  // A dense table when the frame range is sane for the row count, else per-row interpolation.
  const dense =
    Number.isInteger(first) && Number.isInteger(last) && last - first <= 4 * locs.count + 65_536
      ? denseDrift(trajectory, first, last)
      : null
  for (let i = 0; i < locs.count; i++) {
    const f = locs.frame[i] ?? Number.NaN
    if (!Number.isFinite(f)) continue
    const k = f - first
    if (dense && Number.isInteger(k)) {
      x[i] = (x[i] ?? 0) - (dense.x[k] ?? 0)
      y[i] = (y[i] ?? 0) - (dense.y[k] ?? 0)
      continue
    }
    const drift = driftAtFrame(trajectory, f)
    x[i] = (x[i] ?? 0) - drift.x
    y[i] = (y[i] ?? 0) - drift.y
  }
  return { x, y }
}
