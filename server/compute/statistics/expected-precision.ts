/**
 * Expected lateral precision of each localization from its photons and background, with one PSF
 * width and pixel size for the table. Every formula here factors as
 * var(N, b²) = unit(b²/N) / N, where unit(r) is the formula's variance at N = 1, b² = r
 * (DOMAIN.md §1.1 forms). So the shared formulas in shared/domain/optics.ts are evaluated only a
 * few hundred times per table and each row costs a square root:
 * - Thompson 2002 and Mortensen LSQ: unit(r) is linear in r; two calls give it exactly.
 * - Mortensen MLE: ln unit(r) is smooth in ln r; a 128-point table on r = 10⁻⁸ … 10⁴, read by
 *   four-point Lagrange interpolation in ln r (relative error of the precision below 10⁻⁵,
 *   checked by tests), direct calls beyond it.
 */
import {
  EMCCD_EXCESS_NOISE,
  NO_EXCESS_NOISE,
  mortensenLsqPrecisionNm,
  mortensenMlePrecisionNm,
  thompsonPrecisionNm,
} from '@shared/domain/optics'

export type PrecisionFormula = 'thompson' | 'mortensen-mle' | 'mortensen-lsq'

export interface PrecisionModel {
  formula: PrecisionFormula
  /** PSF SD s, camera pixel a (nm), excess-noise factor F (1 or 2 for EMCCD). */
  psfSigmaNm: number
  pixelNm: number
  excessNoise: number
}

const TABLE_POINTS = 128
const LOG_R_MIN = Math.log(1e-8)
const LOG_R_MAX = Math.log(1e4)

function unitVariance(model: PrecisionModel, r: number): number {
  const spot = {
    s: model.psfSigmaNm,
    a: model.pixelNm,
    n: 1,
    b2: r,
    excessNoise: model.excessNoise,
  }
  if (model.formula === 'thompson') return thompsonPrecisionNm(spot) ** 2
  if (model.formula === 'mortensen-lsq') return mortensenLsqPrecisionNm(spot) ** 2
  return mortensenMlePrecisionNm(spot) ** 2
}

/** For Thompson and Mortensen LSQ: var = (shot + perR · b²/N)/N; null for Mortensen MLE. */
export function linearCoefficients(model: PrecisionModel): { shot: number; perR: number } | null {
  if (model.formula === 'mortensen-mle') return null
  const shot = unitVariance(model, 0)
  return { shot, perR: unitVariance(model, 1) - shot }
}

/** A function (N, b²) → expected precision in nm; NaN when N ≤ 0 or b² < 0 or not finite. */
export function expectedPrecision(model: PrecisionModel): (n: number, b2: number) => number {
  const linear = linearCoefficients(model)
  if (linear) {
    const { shot, perR } = linear
    return (n, b2) => (n > 0 && b2 >= 0 ? Math.sqrt((shot + (perR * b2) / n) / n) : NaN)
  }
  const table = new Float64Array(TABLE_POINTS)
  const step = (LOG_R_MAX - LOG_R_MIN) / (TABLE_POINTS - 1)
  for (let i = 0; i < TABLE_POINTS; i++) {
    table[i] = Math.log(unitVariance(model, Math.exp(LOG_R_MIN + i * step)))
  }
  const atZero = unitVariance(model, 0)
  return (n, b2) => {
    if (!(n > 0 && b2 >= 0 && n < Infinity && b2 < Infinity)) return NaN
    const r = b2 / n
    // Below r = 10⁻⁸ the background changes the variance by less than 10⁻⁷ relative.
    if (r < 1e-8) return Math.sqrt(atZero / n)
    const position = (Math.log(r) - LOG_R_MIN) / step
    if (position >= TABLE_POINTS - 1) return Math.sqrt(unitVariance(model, r) / n)
    return Math.sqrt(Math.exp(cubicAt(table, position)) / n)
  }
}

/** Four-point Lagrange interpolation of evenly spaced samples at a fractional index. */
function cubicAt(table: Float64Array, position: number): number {
  const i = Math.min(table.length - 3, Math.max(1, position | 0))
  const t = position - i
  const y0 = table[i - 1] ?? 0
  const y1 = table[i] ?? 0
  const y2 = table[i + 1] ?? 0
  const y3 = table[i + 2] ?? 0
  return (
    (-t * (t - 1) * (t - 2) * y0) / 6 +
    ((t + 1) * (t - 1) * (t - 2) * y1) / 2 -
    ((t + 1) * t * (t - 2) * y2) / 2 +
    ((t + 1) * t * (t - 1) * y3) / 6
  )
}

/** Electron multiplication (EMCCD, intensified or electron-bombarded CCD) doubles the variance. */
export function excessNoiseOf(detector: string | undefined): number {
  return detector === 'emccd' || detector === 'iccd' || detector === 'ebccd'
    ? EMCCD_EXCESS_NOISE
    : NO_EXCESS_NOISE
}
