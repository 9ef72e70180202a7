/**
 * One axis of a pixel-integrated Gaussian kernel: the share of a 1D Gaussian (centre u, SD s, both
 * in pixels) falling in each pixel of a window truncated at ±`truncate`·s, renormalized so the
 * whole window holds exactly 1. Only the pixels inside [0, size) are written; the share of the
 * window they hold is returned, so the caller knows how much of the kernel the view kept.
 */
import { normalCdf } from './normal-cdf'

export interface AxisWindow {
  /** First pixel written (inside the view). */
  first: number
  /** Pixels written. */
  length: number
  /** Share of the kernel on this axis inside the view, 0…1. */
  keptShare: number
}

/** Pixel-edge positions are at whole numbers: pixel c spans [c, c+1). */
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
  const first = Math.max(0, windowStart)
  const end = Math.min(size, windowEnd)
  out.first = first
  out.length = Math.max(0, end - first)
  out.keptShare = 0
  if (out.length === 0) return
  const inverse = 1 / s
  const total = normalCdf((windowEnd - u) * inverse) - normalCdf((windowStart - u) * inverse)
  const scale = 1 / total
  let left = normalCdf((first - u) * inverse)
  let kept = 0
  for (let k = 0; k < out.length; k++) {
    const right = normalCdf((first + k + 1 - u) * inverse)
    const w = (right - left) * scale
    weights[k] = w
    kept += w
    left = right
  }
  out.keptShare = kept
}
