/**
 * Labelling density over the occupied area and the Nyquist resolution it implies (Shroff et al.
 * 2008; DOMAIN.md §1.5 and §6): the resolution R whose Nyquist density (2/R)² equals the measured
 * density. The area is the number of grid pixels holding at least one localization times the pixel
 * area; the count is raw localizations unless merged events are given.
 */
import { nyquistDensityPerUm2 } from '@shared/domain/optics'
import type { Localizations } from '../localizations.types'
import { computed, notComputable, type StatisticResult } from './result'
import { occupancy, type Occupancy } from './occupancy'

export interface DensityOptions {
  /** Occupancy grid pixel, nm (default 20). */
  pixelNm?: number
  /** Number of merged events (distinct-molecule estimate) to use instead of raw localizations. */
  mergedEvents?: number
}

export interface DensitySummary {
  /** What was counted: 'raw localizations' or 'merged events'. */
  countingUnit: string
  counted: number
  pixelNm: number
  occupiedPixels: number
  occupiedAreaUm2: number
  densityPerUm2: number
  /** Resolution whose Nyquist density equals densityPerUm2, nm. */
  nyquistResolutionNm: number
  /** The same over the bounding box of all localizations, for comparison. */
  boundingBoxAreaUm2: number
  densityOverBoundingBoxPerUm2: number
  nyquistResolutionOverBoundingBoxNm: number
}

export const DEFAULT_DENSITY_PIXEL_NM = 20

export const DENSITY_METHOD =
  'Lateral density = count ÷ occupied area (pixels of a square grid holding ≥ 1 localization); ' +
  'Nyquist resolution R from density = (2/R)² (Shroff et al. 2008). Raw localizations over-count ' +
  'molecules that blink more than once, so the density is inflated and R optimistic.'

/** R with nyquistDensityPerUm2(R) = density: (2/R)² scales as R⁻², so R = √(N(1)/density). */
export function nyquistResolutionNm(densityPerUm2: number): number {
  return Math.sqrt(nyquistDensityPerUm2(1) / densityPerUm2)
}

/** Density and Nyquist resolution; `measured` lets a caller reuse the pass (and its extents). */
export function densityStatistics(
  table: Localizations,
  options: DensityOptions = {},
  measured?: Occupancy,
): StatisticResult<DensitySummary> {
  const requested = options.pixelNm ?? DEFAULT_DENSITY_PIXEL_NM
  const merged = options.mergedEvents
  const countingUnit = merged === undefined ? 'raw localizations' : 'merged events'
  const parameters = { pixelNm: requested, countingUnit, dimensions: 2 }
  if (!(requested > 0) || !(merged === undefined || merged > 0)) {
    return notComputable(
      'The pixel size and the number of merged events must be above 0.',
      DENSITY_METHOD,
      parameters,
    )
  }
  const { occupied: pixels, placed, pixelNm, x, y } = measured ?? occupancy(table, requested)
  if (!x || !y || placed === 0) {
    return notComputable('No localization has a finite position.', DENSITY_METHOD, parameters)
  }
  const counted = merged ?? placed
  const occupiedAreaUm2 = (pixels * pixelNm * pixelNm) / 1e6
  const densityPerUm2 = counted / occupiedAreaUm2
  const boundingBoxAreaUm2 = Math.max(((x.max - x.min) * (y.max - y.min)) / 1e6, occupiedAreaUm2)
  const densityOverBoundingBoxPerUm2 = counted / boundingBoxAreaUm2
  return computed(
    {
      countingUnit,
      counted,
      pixelNm,
      occupiedPixels: pixels,
      occupiedAreaUm2,
      densityPerUm2,
      nyquistResolutionNm: nyquistResolutionNm(densityPerUm2),
      boundingBoxAreaUm2,
      densityOverBoundingBoxPerUm2,
      nyquistResolutionOverBoundingBoxNm: nyquistResolutionNm(densityOverBoundingBoxPerUm2),
    },
    DENSITY_METHOD,
    { ...parameters, pixelNmUsed: pixelNm },
  )
}
