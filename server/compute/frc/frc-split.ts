import { fft2dTransposed } from '../fft'
import type { Localizations } from '../localizations.types'
import { applyEdgeTaper, type TaperedCounts } from './edge-taper'
import { renderHalves, type HalfCounts, type TimeBlocks } from './render-halves'
import type { RenderGrid } from './render-grid'
import { ringSums } from './ring-sums'

/** One random split into halves: both renders, taper, one complex FFT, ring sums. */
export interface SplitCurves {
  /** Raw FRC per ring. */
  frc: Float64Array
  /** Ring means of Re A·conj B and of √(|A|²·|B|²). */
  numeratorMean: Float64Array
  denominatorMean: Float64Array
  pixels: Float64Array
  counts: HalfCounts
  tapered: TaperedCounts
}

export interface SplitBuffers {
  re: Float32Array
  im: Float32Array
}

export function computeSplit(
  locs: Localizations,
  grid: RenderGrid,
  blocks: TimeBlocks,
  buffers: SplitBuffers,
): SplitCurves {
  const { re, im } = buffers
  const size = grid.size
  const counts = renderHalves(locs, grid, blocks, re, im)
  const tapered = applyEdgeTaper(re, im, size, counts)
  // Ring sums are symmetric in u and v, so the transposed spectrum serves as well.
  fft2dTransposed(re, im, size)
  const sums = ringSums(re, im, size)
  const rings = sums.pixels.length
  const frc = new Float64Array(rings)
  const numeratorMean = new Float64Array(rings)
  const denominatorMean = new Float64Array(rings)
  for (let k = 0; k < rings; k++) {
    const n = sums.pixels[k]!
    const denominator = Math.sqrt(sums.powerA[k]! * sums.powerB[k]!)
    frc[k] = denominator > 0 ? sums.numerator[k]! / denominator : 0
    numeratorMean[k] = sums.numerator[k]! / n
    denominatorMean[k] = denominator / n
  }
  return { frc, numeratorMean, denominatorMean, pixels: sums.pixels, counts, tapered }
}
