import type { DenseDrift } from '@server/compute/drift'
import type { DriftTrack } from '@server/compute/simulate'

/**
 * RMS (2D) and largest distance between the estimated and the simulated drift over all frames, after
 * removing the mean difference: drift is only defined up to a constant shift of the whole image.
 */
export function driftError(estimated: DenseDrift, truth: DriftTrack | null) {
  const n = estimated.x.length
  const ex = new Float64Array(n)
  const ey = new Float64Array(n)
  let [meanX, meanY] = [0, 0]
  for (let k = 0; k < n; k++) {
    const frame = estimated.firstFrame + k
    ex[k] = (estimated.x[k] ?? 0) - (truth?.x[frame] ?? 0)
    ey[k] = (estimated.y[k] ?? 0) - (truth?.y[frame] ?? 0)
    meanX += (ex[k] ?? 0) / n
    meanY += (ey[k] ?? 0) / n
  }
  let [squares, largest] = [0, 0]
  for (let k = 0; k < n; k++) {
    const distance = Math.hypot((ex[k] ?? 0) - meanX, (ey[k] ?? 0) - meanY)
    squares += distance * distance
    largest = Math.max(largest, distance)
  }
  return { rmsNm: Math.sqrt(squares / n), maxNm: largest, offsetNm: Math.hypot(meanX, meanY) }
}
