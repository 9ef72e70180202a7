/** Options of the Gaussian render and their resolution into pixel units. */
import type { RenderFilter } from './render-view'

export interface GaussianOptions {
  /** A fixed σ for every localization (nm), or 'uncertainty': each row's own precision. */
  sigmaNm?: number | 'uncertainty'
  /** σ used for rows without a finite positive uncertainty (or tables without the column), nm. */
  fallbackSigmaNm?: number
  /** Narrowest kernel, pixels: keeps points visible and smooth on coarse pixels. */
  minSigmaPx?: number
  /** Widest kernel, pixels: caps the work (kernel ≤ (2·truncate·max + 2)² pixels) for huge σ. */
  maxSigmaPx?: number
  /**
   * Kernels end at ±this many σ, default 3 (3–4 is usual). Cutting at 3σ drops 0.27 % of each
   * axis's mass, put back by renormalizing, and costs about 0.6× the work of 4σ.
   */
  truncateSigmas?: number
  filter?: RenderFilter
}

export const GAUSSIAN_DEFAULTS = {
  sigmaNm: 'uncertainty',
  fallbackSigmaNm: 10,
  minSigmaPx: 0.5,
  maxSigmaPx: 32,
  truncateSigmas: 3,
} as const satisfies GaussianOptions

export interface SigmaPlan {
  fixedPx: number | null
  fallbackPx: number
  minPx: number
  maxPx: number
  truncate: number
}

export function resolveSigmas(options: GaussianOptions, pixelNm: number): SigmaPlan {
  const pick = (value: number | undefined, fallback: number) =>
    value !== undefined && Number.isFinite(value) && value > 0 ? value : fallback
  const sigma = options.sigmaNm ?? GAUSSIAN_DEFAULTS.sigmaNm
  const fallbackNm = pick(options.fallbackSigmaNm, GAUSSIAN_DEFAULTS.fallbackSigmaNm)
  // A kernel narrower than a thousandth of a pixel is a point; the floor keeps 1/σ finite.
  const minPx = Math.max(
    1e-3,
    options.minSigmaPx === undefined ? GAUSSIAN_DEFAULTS.minSigmaPx : pick(options.minSigmaPx, 0),
  )
  return {
    fixedPx: typeof sigma === 'number' ? pick(sigma, fallbackNm) / pixelNm : null,
    fallbackPx: fallbackNm / pixelNm,
    minPx,
    maxPx: Math.max(minPx, pick(options.maxSigmaPx, GAUSSIAN_DEFAULTS.maxSigmaPx)),
    truncate: Math.min(
      6,
      Math.max(1, pick(options.truncateSigmas, GAUSSIAN_DEFAULTS.truncateSigmas)),
    ),
  }
}
