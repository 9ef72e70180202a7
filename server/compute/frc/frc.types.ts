/** Options of computeFrc; every field has a documented default (FRC_DEFAULTS). */
export interface FrcOptions {
  /** Render pixel (histogram bin), nm. Keep it ≤ about a quarter of the expected resolution. */
  pixelNm?: number
  /** Time blocks of consecutive frames that are dealt to the two halves. */
  blocks?: number
  /** Random block assignments whose curves and values are averaged (the spread is their SD). */
  splits?: number
  /** Seed of the block assignments; the same seed gives the same halves. */
  seed?: number
  /** Largest render grid side, pixels (a power of two). */
  maxSize?: number
  /** Remove the correlation of one emitter localized in both halves (needs `uncertainty`). */
  correctSpurious?: boolean
  /**
   * How the precision enters H(q), the blur of a pair of localizations of one emitter:
   * 'same' (default; DOMAIN.md §1.4 and the published reference) H = ⟨exp(−4π²σ²q²)⟩, as if both
   * localizations of a pair had the same σ; 'independent' H = ⟨exp(−2π²σ²q²)⟩², the expectation
   * when each localization's σ is an independent draw. They differ only when σ varies.
   */
  precisionPairing?: 'same' | 'independent'
}

export interface FrcCurve {
  /** Ring frequency k/(L·pixel), cycles per nm, rings k = 0 … L/2. */
  frequencyPerNm: number[]
  /** Raw FRC per ring, mean over splits. */
  frc: number[]
  /** LOESS-smoothed FRC (mean over splits). */
  smoothed: number[]
  /** Smoothed FRC after the spurious-correlation correction, when it was made. */
  corrected?: number[]
  /** Frequency pixels in each ring (the variance of FRC for independent halves is ≈ 1/n). */
  pixelsInRing: number[]
}

export interface FrcParameters {
  pixelNm: number
  blocks: number
  splits: number
  seed: number
  maxSize: number
  correctSpurious: boolean
  precisionPairing: 'same' | 'independent'
  /** Render grid side L, pixels. */
  gridSize: number
  /** 'occupied bounding box' or 'central crop of the bounding box' when it exceeded maxSize. */
  field: string
  /** Grid origin (lower corner), nm. */
  originXNm: number
  originYNm: number
  /** LOESS span, rings. */
  smoothingSpan: number
  /** Localizations rendered (finite and on the grid), and in each half (mean over splits). */
  localizationsUsed: number
  localizationsHalfA: number
  localizationsHalfB: number
  /** Splits whose (corrected, if made) curve crossed the threshold. */
  splitsWithCrossing: number
  /** What happened to the spurious-correlation correction, in words. */
  spuriousCorrection: string
  /** Frequency range (cycles/nm) of the plateau Q was estimated from. */
  plateauPerNm?: [number, number]
}

export interface FrcResult {
  /** FRC resolution, nm: corrected for spurious correlation when that correction was made. */
  resolutionNm: number | null
  /** Resolution without the spurious-correlation correction, nm. */
  resolutionUncorrectedNm: number | null
  /** Standard deviation of the resolution over splits, nm. */
  spreadNm: number | null
  /**
   * Q, estimated localizations per emitter (Nieuwenhuizen et al.): strictly, Σ n_A·n_B·(1/N_A + 1/N_B),
   * which equals the mean count per emitter when its localizations fall into the halves
   * independently; repeats within one time block do not count. Null when not estimated.
   */
  localizationsPerEmitter: number | null
  curve: FrcCurve
  threshold: number
  method: string
  parameters: FrcParameters
  reason?: string
}
