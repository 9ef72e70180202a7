import type { DenseDrift, DriftTrajectory } from './trajectory'

export interface DriftOptions {
  /** Number of segments; overrides framesPerSegment. */
  segments?: number
  /** Frames per segment (default 1000), adapted so each segment has enough localizations. */
  framesPerSegment?: number
  /** Fewest localizations per segment (default 1000); segments with under a quarter are skipped. */
  minLocalizationsPerSegment?: number
  /** Most segments (default 30): the pair count grows as T²/2, each pair costs one half FFT. */
  maxSegments?: number
  /** Render pixel, nm (default 20); grows when the field does not fit in maxImageSize pixels. */
  renderPixelNm?: number
  /** Largest image side, pixels (default 512, a power of two). */
  maxImageSize?: number
  /** Largest drift between two segments searched, nm (default 1000). */
  maxShiftNm?: number
  /** Pairs whose residual exceeds this are dropped before the second solve, nm (default: the render pixel used). */
  residualLimitNm?: number
  /** Gaussian smoothing of the correlations, render pixels SD (default 1). */
  smoothingPixels?: number
}

export interface DriftResult {
  trajectory: DriftTrajectory | null
  /** Drift of every frame from the first to the last, nm; null when not estimated. */
  perFrame: DenseDrift | null
  /** Largest distance of the drift from its value at the first frame, nm. */
  totalDriftNm: number | null
  /** Length of the drift path through the segment centres, nm. */
  pathLengthNm: number | null
  /** RMS of the pair residuals |r_ij − (d_j − d_i)| after the second solve, nm. */
  rmsResidualNm: number | null
  pairsUsed: number
  pairsDropped: number
  method: string
  parameters: {
    segments: number
    framesPerSegment: number
    skippedSegments: number
    renderPixelNm: number
    imageSize: number
    maxShiftNm: number
    residualLimitNm: number
    smoothingPixels: number
    minLocalizationsPerSegment: number
  }
  reason?: string
}

export const DRIFT_METHOD =
  'Redundant cross-correlation (Wang et al. 2014): segments of equal frame length rendered as 2D ' +
  'histograms, all pairs cross-correlated by FFT (Gaussian-smoothed), peaks located by a 3-point ' +
  'Gaussian fit per axis, r_ij = d_j − d_i solved by least squares with d_0 = 0, pairs with large ' +
  'residuals dropped and the system solved again; a second pass on drift-corrected positions ' +
  'measures what is left; linear interpolation between segment centres.'

export const DRIFT_DEFAULTS = {
  framesPerSegment: 1000,
  minLocalizationsPerSegment: 1000,
  maxSegments: 30,
  renderPixelNm: 20,
  maxImageSize: 512,
  maxShiftNm: 1000,
  smoothingPixels: 1,
}

export type DriftSettings = typeof DRIFT_DEFAULTS & { segments?: number; residualLimitNm?: number }

export function notEstimated(parameters: DriftResult['parameters'], reason: string): DriftResult {
  return {
    trajectory: null,
    perFrame: null,
    totalDriftNm: null,
    pathLengthNm: null,
    rmsResidualNm: null,
    pairsUsed: 0,
    pairsDropped: 0,
    method: DRIFT_METHOD,
    parameters,
    reason,
  }
}
