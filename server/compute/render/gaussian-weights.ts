/**
 * One axis of a pixel-integrated Gaussian kernel: the share of a 1D Gaussian (centre u, SD s, both
 * in pixels) falling in each pixel of a window truncated at ±`truncate`·s. Weights are written
 * unnormalized for the pixels inside [0, size); `scale` renormalizes them so the whole window
 * (inside the view or not) holds exactly 1, and `keptShare` is the normalized share inside.
 */
import { normalCdf } from './normal-cdf'

export interface AxisWindow {
  /** First pixel written (inside the view). */
  first: number
  /** Pixels written. */
  length: number
  /** Factor that normalizes the written weights over the whole window. */
  scale: number
  /** Share of the kernel on this axis inside the view, 0…1. */
  keptShare: number
}

export const emptyWindow = (): AxisWindow => ({ first: 0, length: 0, scale: 0, keptShare: 0 })

/** Pixel edges are at whole numbers: pixel c spans [c, c+1). */
export function fillAxisWeights(
  u: number,
  s: number,
  truncate: number,
  size: number,
  weights: Float64Array,
  out: AxisWindow,
): void {
  const windowStart = Math.floor(u - truncate * s)
  const windowEnd = Math.floor(u + truncate * s) + 1
  const first = windowStart > 0 ? windowStart : 0
  const end = windowEnd < size ? windowEnd : size
  out.first = first
  out.length = end > first ? end - first : 0
  out.keptShare = 0
  if (end <= first) return
  const inverse = 1 / s
  const firstEdge = normalCdf((first - u) * inverse)
  let left = firstEdge
  for (let k = 0; k < end - first; k++) {
    const right = normalCdf((first + k + 1 - u) * inverse)
    weights[k] = right - left
    left = right
  }
  // The window's own ends are the edges just computed unless the view cut the window.
  const low = first === windowStart ? firstEdge : normalCdf((windowStart - u) * inverse)
  const high = end === windowEnd ? left : normalCdf((windowEnd - u) * inverse)
  out.scale = 1 / (high - low)
  out.keptShare = (left - firstEdge) * out.scale
}
