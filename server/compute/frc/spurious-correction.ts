import type { NumericColumn } from '../localizations.types'

/**
 * Correction for spurious correlation (Nieuwenhuizen et al. 2013, their Q correction): an emitter
 * localized in both halves correlates them at every frequency. Its expected share of the ring mean
 * of Re A·conj B is Σ_m n_A,m·n_B,m · H(q)·sinc²(πqa), with H(q) = ⟨exp(−4π²σ²q²)⟩ over the
 * localizations' precisions σ and a the render pixel. Writing it as Q·H·sinc² / (1/N_A + 1/N_B)
 * makes Q the mean number of localizations per emitter (for emitters whose localizations fall into
 * the halves independently). Q is read off where the structure no longer contributes: the
 * high-frequency plateau of numerator/(H·sinc²)·(1/N_A + 1/N_B).
 */

/** Bins of the precision histogram that H(q) is averaged over (bin width = largest σ / bins). */
const PRECISION_BINS = 1024

/**
 * H(q) on the given frequencies, or the reason it cannot be formed. 'same': ⟨exp(−4π²σ²q²)⟩;
 * 'independent': ⟨exp(−2π²σ²q²)⟩² (see FrcOptions.precisionPairing).
 */
export function precisionTransfer(
  uncertainty: NumericColumn | undefined,
  count: number,
  frequencyPerNm: ArrayLike<number>,
  pairing: 'same' | 'independent' = 'same',
): { transfer: Float64Array } | { reason: string } {
  if (!uncertainty) return { reason: 'the table has no localization precision (uncertainty)' }
  let largest = 0
  let usable = 0
  for (let i = 0; i < count; i++) {
    const sigma = uncertainty[i]!
    if (sigma > 0 && sigma < Infinity) {
      usable++
      if (sigma > largest) largest = sigma
    }
  }
  if (usable < count / 2) {
    return { reason: 'fewer than half of the localizations have a positive, finite precision' }
  }
  const histogram = new Float64Array(PRECISION_BINS)
  const perBin = PRECISION_BINS / largest
  for (let i = 0; i < count; i++) {
    const sigma = uncertainty[i]!
    if (sigma > 0 && sigma < Infinity)
      histogram[Math.min(PRECISION_BINS - 1, Math.floor(sigma * perBin))]!++
  }
  const transfer = new Float64Array(frequencyPerNm.length)
  const exponent = pairing === 'same' ? 4 * Math.PI * Math.PI : 2 * Math.PI * Math.PI
  for (let k = 0; k < transfer.length; k++) {
    const q = frequencyPerNm[k]!
    let sum = 0
    for (let bin = 0; bin < PRECISION_BINS; bin++) {
      const n = histogram[bin]!
      if (n === 0) continue
      const sigma = (bin + 0.5) / perBin
      sum += n * Math.exp(-exponent * sigma * sigma * q * q)
    }
    transfer[k] = pairing === 'same' ? sum / usable : (sum / usable) ** 2
  }
  return { transfer }
}

/** sinc²(πqa): the transfer of binning into square pixels of side a (ring-averaged form). */
export function pixelTransfer(q: number, pixelNm: number): number {
  const x = Math.PI * q * pixelNm
  return x === 0 ? 1 : (Math.sin(x) / x) ** 2
}

export interface RepeatsEstimate {
  /** Q, localizations per emitter seen in both halves (≥ 0); null when no ring had signal. */
  repeats: number | null
  /** Lowest and highest ring of the plateau band. */
  firstRing: number
  lastRing: number
}

/**
 * The band stops growing once Q is known to this standard error (localizations per emitter), and
 * never reaches frequencies where H·sinc² is above PLATEAU_MAX_TRANSFER (there the structure of
 * the sample, not the repeats, dominates the numerator).
 */
const PLATEAU_STANDARD_ERROR = 0.2
const PLATEAU_MAX_TRANSFER = 0.5

/**
 * Q from the high-frequency plateau of v(q) = numerator/(H·sinc²)·(1/N_A + 1/N_B). The plateau is
 * the highest-frequency band of rings that pins Q down to ±PLATEAU_STANDARD_ERROR: rings are added
 * from Nyquist downwards, so the band sits as far from the sample's structure as the noise allows.
 * Within it, v is averaged with inverse-variance weights: the ring mean of the numerator has noise
 * SD ≈ denominator/√n, so v_k has SD den_k·scale/(√n_k·T_k).
 */
export function estimateRepeats(
  numeratorMean: ArrayLike<number>,
  denominatorMean: ArrayLike<number>,
  transfer: ArrayLike<number>,
  pixels: ArrayLike<number>,
  countScale: number,
): RepeatsEstimate {
  let weightedSum = 0
  let weights = 0
  const lastRing = transfer.length - 1
  let firstRing = lastRing + 1
  for (let k = lastRing; k >= 1; k--) {
    const t = transfer[k]!
    const noise = denominatorMean[k]! * countScale
    if (t > PLATEAU_MAX_TRANSFER) break
    if (weights > 0 && 1 / Math.sqrt(weights) <= PLATEAU_STANDARD_ERROR) break
    firstRing = k
    if (!(t > 0 && noise > 0)) continue
    const w = (pixels[k]! * t * t) / (noise * noise)
    weightedSum += w * ((numeratorMean[k]! / t) * countScale)
    weights += w
  }
  const repeats = weights > 0 ? Math.max(0, weightedSum / weights) : null
  return { repeats, firstRing, lastRing }
}

/** (num − spur)/(den + spur) per ring, spur = Q·H·sinc²/(1/N_A + 1/N_B). */
export function correctedFrc(
  numeratorMean: ArrayLike<number>,
  denominatorMean: ArrayLike<number>,
  transfer: ArrayLike<number>,
  repeats: number,
  countScale: number,
): Float64Array {
  const corrected = new Float64Array(numeratorMean.length)
  for (let k = 0; k < corrected.length; k++) {
    const spurious = (repeats * transfer[k]!) / countScale
    const denominator = denominatorMean[k]! + spurious
    corrected[k] = denominator > 0 ? (numeratorMean[k]! - spurious) / denominator : 0
  }
  return corrected
}
