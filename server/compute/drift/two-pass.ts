import type { Localizations } from '../localizations.types'
import { correlateAllPairs } from './correlate-pairs'
import { chooseGrid, segmentSpectra } from './render-spectra'
import type { SegmentPlan } from './segments'
import { solveSegmentDrift } from './solve-shifts'
import {
  denseDrift,
  maxDisplacementNm,
  pathLengthNm,
  trajectoryFrom,
  type DenseDrift,
} from './trajectory'
import { DRIFT_METHOD, notEstimated, type DriftResult, type DriftSettings } from './types'

/** Pass 2 searches this many render pixels around zero: the first pass left sub-pixel shifts. */
const REFINE_REACH_PIXELS = 8

/**
 * Two passes of redundant cross-correlation. The second renders every position less the first
 * pass's drift of its frame, so the shifts left to measure are a fraction of a pixel, where the
 * 3-point peak fit is least biased (the bias grows with the fractional shift: DOMAIN §6), and drift
 * within a segment no longer blurs its image. The two segment drifts add up.
 */
export function measureDrift(
  locs: Localizations,
  plan: SegmentPlan,
  kept: number[],
  o: DriftSettings,
  parameters: DriftResult['parameters'],
): DriftResult {
  const grid = chooseGrid(plan, o.renderPixelNm, o.maxShiftNm, o.maxImageSize)
  parameters.renderPixelNm = grid.pixelNm
  parameters.imageSize = grid.size
  parameters.residualLimitNm = o.residualLimitNm ?? grid.pixelNm
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
