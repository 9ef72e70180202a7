import { frcSmoothingSpan } from './loess'
import type { FrcOptions, FrcParameters, FrcResult } from './frc.types'
import type { RenderGrid } from './render-grid'
import { FRC_THRESHOLD } from './threshold'

export const FRC_METHOD =
  'FRC (Nieuwenhuizen 2013): halves from random time blocks, 2D histograms, cosine edge taper, ' +
  'ring correlation, LOESS, fixed 1/7 threshold, spurious-correlation (Q) correction'

type Settings = Required<FrcOptions>

export function baseParameters(settings: Settings, grid?: RenderGrid): FrcParameters {
  return {
    ...settings,
    gridSize: grid?.size ?? 0,
    field: grid?.field ?? 'none',
    originXNm: grid?.originXNm ?? 0,
    originYNm: grid?.originYNm ?? 0,
    smoothingSpan: grid ? frcSmoothingSpan(grid.size) : 0,
    localizationsUsed: 0,
    localizationsHalfA: 0,
    localizationsHalfB: 0,
    splitsWithCrossing: 0,
    spuriousCorrection: settings.correctSpurious ? 'not reached' : 'off',
  }
}

/** A result with no values, saying why. */
export function undeterminedResult(parameters: FrcParameters, reason: string): FrcResult {
  return {
    resolutionNm: null,
    resolutionUncorrectedNm: null,
    spreadNm: null,
    localizationsPerEmitter: null,
    curve: { frequencyPerNm: [], frc: [], smoothed: [], pixelsInRing: [] },
    threshold: FRC_THRESHOLD,
    method: FRC_METHOD,
    parameters,
    reason,
  }
}
