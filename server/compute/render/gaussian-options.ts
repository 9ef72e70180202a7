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

export type ResolvedGaussianOptions = Required<Omit<GaussianOptions, 'filter'>>

const positive = (value: number | undefined): value is number =>
  value !== undefined && value > 0 && value < Infinity

/**
 * The options after defaults; unusable values (not finite, not positive) take the default, a
 * fixed σ that is unusable means each row's own, and the truncation stays within 1…6 σ.
 */
export function resolveGaussianOptions(options: GaussianOptions = {}): ResolvedGaussianOptions {
  const d = GAUSSIAN_DEFAULTS
  const { sigmaNm, fallbackSigmaNm, minSigmaPx, maxSigmaPx, truncateSigmas } = options
  const minPx = minSigmaPx !== undefined && minSigmaPx >= 0 && minSigmaPx < Infinity
  return {
    sigmaNm: typeof sigmaNm === 'number' && positive(sigmaNm) ? sigmaNm : 'uncertainty',
    fallbackSigmaNm: positive(fallbackSigmaNm) ? fallbackSigmaNm : d.fallbackSigmaNm,
    minSigmaPx: minPx ? minSigmaPx : d.minSigmaPx,
    maxSigmaPx: positive(maxSigmaPx) ? maxSigmaPx : d.maxSigmaPx,
    truncateSigmas: positive(truncateSigmas)
      ? Math.min(6, Math.max(1, truncateSigmas))
      : d.truncateSigmas,
  }
}

/** The options in pixels of one view. */
export interface SigmaPlan {
  fixedPx: number | null
  fallbackPx: number
  minPx: number
  maxPx: number
  truncate: number
}

export function resolveSigmas(options: GaussianOptions, pixelNm: number): SigmaPlan {
  const o = resolveGaussianOptions(options)
  // A kernel narrower than a thousandth of a pixel is a point; the floor keeps 1/σ finite.
  const minPx = Math.max(1e-3, o.minSigmaPx)
  return {
    fixedPx: o.sigmaNm === 'uncertainty' ? null : o.sigmaNm / pixelNm,
    fallbackPx: o.fallbackSigmaNm / pixelNm,
    minPx,
    maxPx: Math.max(minPx, o.maxSigmaPx),
    truncate: o.truncateSigmas,
  }
}
