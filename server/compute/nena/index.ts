import type { Localizations } from '../localizations.types'
import { fitNena } from './fit-nena'
import { nextFrameDistanceHistogram } from './next-frame-distances'

export { nenaRayleighDensity } from './fit-nena'

export interface NenaOptions {
  /** Largest next-frame neighbour distance looked at, nm. Default 150 (≈ 10× a typical σ). */
  searchRadiusNm?: number
  /** Histogram bin width, nm. Default 1. */
  binNm?: number
  /** Fewest neighbour pairs for a fit. Default 200. */
  minPairs?: number
}

export interface NenaResult {
  /** Localization precision σ (SD per axis), nm; null when it cannot be estimated. */
  precisionNm: number | null
  fitQuality: {
    rSquared: number
    /** Share of the pairs the fit gives to the Rayleigh (same-molecule) part. */
    rayleighShare: number
  } | null
  histogram: { edges: number[]; counts: number[] }
  /** Expected count per histogram bin under the fit (bins as in `histogram`). */
  fittedCounts: number[] | null
  pairsUsed: number
  method: string
  parameters: { searchRadiusNm: number; binNm: number; minPairs: number; excludedRows: number }
  reason?: string
}

export const NENA_METHOD =
  'NeNA (Endesfelder et al. 2014): distance from each localization to its nearest neighbour in ' +
  'the next frame; least-squares fit of the bin-integrated Rayleigh law of scale √2·σ plus a term ' +
  'linear in distance for unrelated neighbours (the paper’s extra Gaussian term is not fitted).'

const DEFAULTS = { searchRadiusNm: 150, binNm: 1, minPairs: 200 }
/** Below this share of Rayleigh pairs the histogram is mostly unrelated neighbours. */
const MIN_RAYLEIGH_SHARE = 0.05

/** Localization precision from the data: nearest neighbours in adjacent frames (DOMAIN §1.10). */
export function estimateNenaPrecision(locs: Localizations, options: NenaOptions = {}): NenaResult {
  const parameters = {
    searchRadiusNm: options.searchRadiusNm ?? DEFAULTS.searchRadiusNm,
    binNm: options.binNm ?? DEFAULTS.binNm,
    minPairs: options.minPairs ?? DEFAULTS.minPairs,
    excludedRows: 0,
  }
  const { searchRadiusNm, binNm } = parameters
  if (
    !(searchRadiusNm > 0 && binNm > 0 && binNm < searchRadiusNm) ||
    !Number.isFinite(searchRadiusNm)
  ) {
    return unfitted(
      parameters,
      { edges: [], counts: [] },
      0,
      'search radius and bin width must be positive, the bin narrower than the radius',
    )
  }
  const distances = nextFrameDistanceHistogram(locs, searchRadiusNm, binNm)
  parameters.excludedRows = distances.excludedRows
  const histogram = { edges: distances.edges, counts: distances.counts }
  if (distances.pairs < parameters.minPairs) {
    const found =
      distances.adjacentFrames === 0
        ? 'no two adjacent frames hold localizations'
        : `only ${distances.pairs} next-frame neighbours within ${searchRadiusNm} nm`
    return unfitted(
      parameters,
      histogram,
      distances.pairs,
      `${found}; at least ${parameters.minPairs} are needed`,
    )
  }
  const fit = fitNena(distances.edges, distances.counts)
  const rayleighShare = fit.rayleighPairs / Math.max(1, fit.rayleighPairs + fit.linearPairs)
  const base = {
    fitQuality: { rSquared: fit.rSquared, rayleighShare },
    histogram,
    fittedCounts: fit.expected,
    pairsUsed: distances.pairs,
    method: NENA_METHOD,
    parameters,
  }
  if (fit.atBound)
    return {
      ...base,
      precisionNm: null,
      reason: 'the fit found no minimum inside the searched σ range',
    }
  if (rayleighShare < MIN_RAYLEIGH_SHARE) {
    return {
      ...base,
      precisionNm: null,
      reason:
        'too few molecules are seen in consecutive frames: the neighbours are mostly unrelated',
    }
  }
  return { ...base, precisionNm: fit.sigmaNm }
}

function unfitted(
  parameters: NenaResult['parameters'],
  histogram: NenaResult['histogram'],
  pairsUsed: number,
  reason: string,
): NenaResult {
  return {
    precisionNm: null,
    fitQuality: null,
    histogram,
    fittedCounts: null,
    pairsUsed,
    method: NENA_METHOD,
    parameters,
    reason,
  }
}
