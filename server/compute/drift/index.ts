import type { Localizations } from '../localizations.types'
import { planSegments, scanRows } from './segments'
import { measureDrift } from './two-pass'
import {
  DRIFT_DEFAULTS,
  notEstimated,
  type DriftOptions,
  type DriftResult,
  type DriftSettings,
} from './types'

export { applyDriftCorrection, driftAtFrame } from './trajectory'
export type { DenseDrift, DriftTrajectory } from './trajectory'
export { DRIFT_DEFAULTS, DRIFT_METHOD, type DriftOptions, type DriftResult } from './types'

/** Sample drift over the acquisition by redundant cross-correlation (DOMAIN §1.9). */
export function estimateDrift(locs: Localizations, options: DriftOptions = {}): DriftResult {
  const o: DriftSettings = { ...DRIFT_DEFAULTS, ...definedOnly(options) }
  const parameters = initialParameters(o)
  const fail = (reason: string) => notEstimated(parameters, reason)
  if (!(o.renderPixelNm > 0 && o.maxShiftNm > 0 && o.minLocalizationsPerSegment >= 1)) {
    return fail('render pixel, largest shift and localizations per segment must be positive')
  }
  const scan = scanRows(locs)
  if (!scan) return fail('no localization has a finite x, y and a whole frame ≥ 0')
  const span = scan.lastFrame - scan.firstFrame + 1
  if (span < 2) return fail('all localizations are in one frame: there is no drift to follow')
  if (span > 100 * scan.usableRows + 1_000_000) {
    return fail(
      `frames span ${span} for ${scan.usableRows} localizations: frame numbers look wrong`,
    )
  }
  const count = segmentCount(o, span, scan.usableRows)
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
  return measureDrift(locs, plan, kept, o, parameters)
}

/** Parameters as asked; segment counts and the grid are filled in once known. */
function initialParameters(o: DriftSettings): DriftResult['parameters'] {
  return {
    segments: 0,
    framesPerSegment: 0,
    skippedSegments: 0,
    renderPixelNm: o.renderPixelNm,
    imageSize: 0,
    maxShiftNm: o.maxShiftNm,
    residualLimitNm: o.residualLimitNm ?? o.renderPixelNm,
    smoothingPixels: o.smoothingPixels,
    minLocalizationsPerSegment: o.minLocalizationsPerSegment,
  }
}

/** Segments of ~framesPerSegment frames (or as asked), no more than the localizations can fill. */
function segmentCount(o: DriftSettings, span: number, usableRows: number): number {
  const byFrames = o.segments ?? Math.round(span / o.framesPerSegment)
  const byRows = Math.floor(usableRows / o.minLocalizationsPerSegment)
  return Math.min(Math.max(2, byFrames), byRows, o.maxSegments, Math.floor(span))
}

/** Options without the keys explicitly set to undefined, so spreading them keeps the defaults. */
function definedOnly(options: DriftOptions): Partial<DriftSettings> {
  return Object.fromEntries(Object.entries(options).filter(([, value]) => value !== undefined))
}
