import type { Localizations } from '../localizations.types'
import { correlateAllPairs } from './correlate-pairs'
import { chooseGrid, segmentSpectra } from './render-spectra'
import { planSegments, scanRows, type SegmentPlan } from './segments'
import { solveSegmentDrift } from './solve-shifts'
import {
  denseDrift,
  maxDisplacementNm,
  pathLengthNm,
  trajectoryFrom,
  type DenseDrift,
  type DriftTrajectory,
} from './trajectory'

export { applyDriftCorrection, driftAtFrame } from './trajectory'
export type { DenseDrift, DriftTrajectory } from './trajectory'

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
  /** Pairs whose residual exceeds this are dropped before the second solve, nm (default: 1 pixel). */
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

const DEFAULTS = {
  framesPerSegment: 1000,
  minLocalizationsPerSegment: 1000,
  maxSegments: 30,
  renderPixelNm: 20,
  maxImageSize: 512,
  maxShiftNm: 1000,
  smoothingPixels: 1,
}

/** Sample drift over the acquisition by redundant cross-correlation (DOMAIN §1.9). */
export function estimateDrift(locs: Localizations, options: DriftOptions = {}): DriftResult {
  const o = { ...DEFAULTS, ...definedOnly(options) }
  const parameters: DriftResult['parameters'] = {
    segments: 0,
    framesPerSegment: 0,
    skippedSegments: 0,
    renderPixelNm: o.renderPixelNm,
    imageSize: 0,
    maxShiftNm: o.maxShiftNm,
    residualLimitNm: options.residualLimitNm ?? o.renderPixelNm,
    smoothingPixels: o.smoothingPixels,
    minLocalizationsPerSegment: o.minLocalizationsPerSegment,
  }
  const fail = (reason: string) => notEstimated(parameters, reason)
  if (!(o.renderPixelNm > 0 && o.maxShiftNm > 0 && o.minLocalizationsPerSegment >= 1)) {
    return fail('render pixel, largest shift and localizations per segment must be positive')
  }
  const scan = scanRows(locs)
  if (!scan) return fail('no localization has a finite x, y and frame')
  const span = scan.lastFrame - scan.firstFrame + 1
  if (span < 2) return fail('all localizations are in one frame: there is no drift to follow')
  if (span > 100 * scan.usableRows + 1_000_000) {
    return fail(
      `frames span ${span} for ${scan.usableRows} localizations: frame numbers look wrong`,
    )
  }
  const byFrames = o.segments ?? Math.round(span / o.framesPerSegment)
  const byRows = Math.floor(scan.usableRows / o.minLocalizationsPerSegment)
  const count = Math.min(Math.max(2, byFrames), byRows, o.maxSegments, Math.floor(span))
  if (count < 2) {
    return fail(
      `too few localizations: ${scan.usableRows} usable, at least ${2 * o.minLocalizationsPerSegment} needed for two segments`,
    )
  }
  const plan = planSegments(locs, scan, count)
  const kept = plan.rows.flatMap((rows, k) => (rows >= o.minLocalizationsPerSegment / 4 ? [k] : []))
  parameters.segments = kept.length
  parameters.framesPerSegment = span / count
  parameters.skippedSegments = count - kept.length
  if (kept.length < 2) return fail('fewer than two segments hold enough localizations')
  return correlateAndSolve(locs, plan, kept, o, parameters)
}

/** Pass 2 searches this many render pixels around zero: the first pass left sub-pixel shifts. */
const REFINE_REACH_PIXELS = 8

/**
 * Two passes of redundant cross-correlation. The second renders every position less the first
 * pass's drift of its frame, so the shifts left to measure are a fraction of a pixel, where the
 * 3-point peak fit is least biased (the bias grows with the fractional shift: DOMAIN §6), and drift
 * within a segment no longer blurs its image. The two segment drifts add up.
 */
function correlateAndSolve(
  locs: Localizations,
  plan: SegmentPlan,
  kept: number[],
  o: typeof DEFAULTS,
  parameters: DriftResult['parameters'],
): DriftResult {
  const grid = chooseGrid(plan, o.renderPixelNm, o.maxShiftNm, o.maxImageSize)
  parameters.renderPixelNm = grid.pixelNm
  parameters.imageSize = grid.size
  const pass = (correction: DenseDrift | null, reachNm: number) => {
    const spectra = segmentSpectra(locs, plan, grid, kept, correction)
    const pairs = correlateAllPairs(spectra, grid, reachNm, o.smoothingPixels)
    return solveSegmentDrift(pairs, kept.length, parameters.residualLimitNm)
  }
  const coarse = pass(null, o.maxShiftNm)
  if (!coarse.connected) {
    const reason = 'some segments could not be matched to the others by correlation'
    return {
      ...notEstimated(parameters, reason),
      pairsUsed: coarse.pairsUsed,
      pairsDropped: coarse.pairsDropped,
    }
  }
  const centres = kept.map((k) => ((plan.startFrame[k] ?? 0) + (plan.endFrame[k] ?? 0) - 1) / 2)
  const firstGuess = trajectoryFrom(centres, coarse.x, coarse.y, plan.firstFrame)
  const fine = pass(
    denseDrift(firstGuess, plan.firstFrame, plan.lastFrame),
    REFINE_REACH_PIXELS * grid.pixelNm,
  )
  const solved = fine.connected
    ? fine
    : { ...coarse, x: new Float64Array(kept.length), y: new Float64Array(kept.length) }
  const sumX = coarse.x.map((value, k) => value + (solved.x[k] ?? 0))
  const sumY = coarse.y.map((value, k) => value + (solved.y[k] ?? 0))
  const trajectory = trajectoryFrom(centres, sumX, sumY, plan.firstFrame)
  const perFrame = denseDrift(trajectory, plan.firstFrame, plan.lastFrame)
  return {
    trajectory,
    perFrame,
    totalDriftNm: maxDisplacementNm(perFrame),
    pathLengthNm: pathLengthNm(trajectory),
    rmsResidualNm: solved.rmsResidualNm,
    pairsUsed: solved.pairsUsed,
    pairsDropped: solved.pairsDropped,
    method: DRIFT_METHOD,
    parameters,
  }
}

function notEstimated(parameters: DriftResult['parameters'], reason: string): DriftResult {
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

/** Options without the keys explicitly set to undefined, so spreading them keeps the defaults. */
function definedOnly(options: DriftOptions): Partial<typeof DEFAULTS> & { segments?: number } {
  return Object.fromEntries(Object.entries(options).filter(([, value]) => value !== undefined))
}
