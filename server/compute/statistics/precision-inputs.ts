/**
 * What the expected-precision formulas need from a table and its metadata, and the per-row
 * expected precision itself.
 */
import type { Localizations } from '../localizations.types'
import type { DistributionOptions } from './distribution'
import type { ValueSource } from './distribution'
import {
  excessNoiseOf,
  expectedPrecision,
  linearCoefficients,
  type PrecisionFormula,
} from './expected-precision'
import { gaussianPsfSigmaNm } from '@shared/domain/optics'
import type { ParameterValue } from './result'
import { systematicSample } from './sampling'

export interface PrecisionOptions {
  /** Camera pixel size at the sample, nm; needed for expected precision. */
  pixelNm?: number
  /** The description's fitted PSF SD, nm: used when the table has no sigma column. */
  psfSigmaNm?: number
  /** Emission wavelength and NA: the ideal PSF 0.21 λ/NA when no width is known (a lower bound). */
  emissionNm?: number
  numericalAperture?: number
  /** Background photons per pixel when the table has no background column. */
  backgroundPhotons?: number
  /** Read noise, photons RMS per pixel; its square is added to b² unless EM gain hides it (§6). */
  readNoisePhotons?: number
  /**
   * Cameras with electron multiplication (EMCCD, intensified and electron-bombarded CCD) select
   * Mortensen with F = 2; anything else Thompson (default 'unknown').
   */
  detector?: PrecisionDetector
  /** Estimator assumed for Mortensen (default 'mle'). */
  fit?: 'mle' | 'lsq'
  /** Rows sampled for the expected median when the table has its own column (default 65 536). */
  sampleSize?: number
  distribution?: DistributionOptions
}

/** The detector kinds the formulas tell apart (OME types map onto these in the quality job). */
export const PRECISION_DETECTORS = ['emccd', 'iccd', 'ebccd', 'scmos', 'ccd', 'unknown'] as const
export type PrecisionDetector = (typeof PRECISION_DETECTORS)[number]
const MULTIPLYING: readonly PrecisionDetector[] = ['emccd', 'iccd', 'ebccd']

export type PsfSigmaSource = 'sigma column' | 'description' | 'ideal'
export const PSF_SOURCE_TEXT: Record<PsfSigmaSource, string> = {
  'sigma column': 'median of the sigma column',
  description: "the description's fitted PSF width",
  ideal: 'ideal 0.21 λ/NA, a lower bound (fitted PSFs are wider, DOMAIN.md §6)',
}

export const FORMULA_NAMES: Record<PrecisionFormula, string> = {
  thompson: 'Thompson, Larson & Webb 2002',
  'mortensen-mle': 'Mortensen et al. 2010, maximum likelihood',
  'mortensen-lsq': 'Mortensen et al. 2010, least squares',
}

export interface PrecisionInputs {
  pixelNm: number
  psfSigmaNm: number
  psfSigmaSource: PsfSigmaSource
  formula: PrecisionFormula
  excessNoise: number
  readNoise2: number
  /** Background level used when the table has no background column (else NaN). */
  backgroundPhotons: number
}

/** The formula's inputs, or the reason they are missing. */
export function expectationInputs(
  table: Localizations,
  options: PrecisionOptions,
): PrecisionInputs | string {
  if (!table.photons) return 'The table has no photon counts.'
  if (!table.background && options.backgroundPhotons === undefined) {
    return 'The table has no background column and no background level was given.'
  }
  const pixelNm = options.pixelNm
  if (!(pixelNm !== undefined && pixelNm > 0 && pixelNm < Infinity)) {
    return 'The camera pixel size is unknown.'
  }
  const psf = psfSigmaOf(table, options)
  if (!psf)
    return 'The PSF width is unknown (no sigma column, none described, no wavelength and NA).'
  const multiplying = MULTIPLYING.includes(options.detector ?? 'unknown')
  const formula = multiplying
    ? options.fit === 'lsq'
      ? 'mortensen-lsq'
      : 'mortensen-mle'
    : 'thompson'
  // Electron multiplication makes the read noise negligible; sCMOS and CCD add it to b².
  const readNoise = multiplying ? 0 : (options.readNoisePhotons ?? 0)
  return {
    pixelNm,
    ...psf,
    formula,
    excessNoise: excessNoiseOf(options.detector),
    readNoise2: readNoise * readNoise,
    backgroundPhotons: options.backgroundPhotons ?? NaN,
  }
}

const usable = (v: number | null | undefined): v is number =>
  v !== null && v !== undefined && v > 0 && v < Infinity

/** The table's measured width, else the described one, else the ideal one (a lower bound). */
function psfSigmaOf(table: Localizations, options: PrecisionOptions) {
  const measured = medianOf(table.sigma, table.count)
  if (usable(measured)) return { psfSigmaNm: measured, psfSigmaSource: 'sigma column' as const }
  if (usable(options.psfSigmaNm))
    return { psfSigmaNm: options.psfSigmaNm, psfSigmaSource: 'description' as const }
  const { emissionNm, numericalAperture } = options
  if (usable(emissionNm) && usable(numericalAperture))
    return {
      psfSigmaNm: gaussianPsfSigmaNm(emissionNm, numericalAperture),
      psfSigmaSource: 'ideal' as const,
    }
  return null
}

/** Median (rank ⌈n/2⌉) of a systematic sample of up to 65 536 rows. */
function medianOf(column: Localizations['sigma'], count: number): number | null {
  if (!column) return null
  const sample = systematicSample(column, count, 65_536)
  return sample.length ? (sample[Math.ceil(sample.length / 2) - 1] ?? null) : null
}

// Rows per chunk when the expected precision of a whole table is histogrammed: 256 KiB of
// float32, so a 10-million-row table never needs a 40 MB column of its own.
const CHUNK_ROWS = 65_536

/** Writes the expected precision of rows first, first + stride, … into `out` (NaN if unusable). */
function fillExpected(
  table: Localizations,
  inputs: PrecisionInputs,
  out: Float32Array,
  rows: { first: number; stride: number; length: number },
): void {
  const { photons, background } = table
  const b2Extra = inputs.readNoise2
  const b2Fixed = inputs.backgroundPhotons
  const linear = linearCoefficients(inputs)
  const general = linear ? null : expectedPrecision(inputs)
  const shot = linear?.shot ?? 0
  const perR = linear?.perR ?? 0
  for (let k = 0, i = rows.first; k < rows.length; k++, i += rows.stride) {
    const n = photons ? (photons[i] ?? NaN) : NaN
    const b2 = (background ? (background[i] ?? NaN) : b2Fixed) + b2Extra
    if (general) out[k] = general(n, b2)
    else out[k] = n > 0 && b2 >= 0 ? Math.sqrt((shot + (perR * b2) / n) / n) : NaN
  }
}

/** The expected precision of every row as a value source: sampled, or visited in chunks. */
export function expectedValues(table: Localizations, inputs: PrecisionInputs): ValueSource {
  const { count } = table
  return {
    count,
    sample(size) {
      const stride = Math.max(1, Math.floor(count / size))
      const first = Math.floor((stride - 1) / 2)
      const length = Math.max(0, Math.floor((count - 1 - first) / stride) + 1)
      const out = new Float32Array(length)
      fillExpected(table, inputs, out, { first, stride, length })
      return Float64Array.from(out.filter((v) => v - v === 0)).sort()
    },
    chunks(visit) {
      const chunk = new Float32Array(Math.min(CHUNK_ROWS, count))
      for (let first = 0; first < count; first += CHUNK_ROWS) {
        const length = Math.min(CHUNK_ROWS, count - first)
        fillExpected(table, inputs, chunk, { first, stride: 1, length })
        visit(chunk, length)
      }
    },
  }
}

export function describePrecisionInputs(
  inputs: PrecisionInputs | string,
): Record<string, ParameterValue> {
  if (typeof inputs === 'string') return { expected: inputs }
  return {
    formula: FORMULA_NAMES[inputs.formula],
    pixelNm: inputs.pixelNm,
    psfSigmaNm: inputs.psfSigmaNm,
    psfSigmaSource: PSF_SOURCE_TEXT[inputs.psfSigmaSource],
    excessNoise: inputs.excessNoise,
    excessNoiseMeaning:
      inputs.excessNoise === 1
        ? 'no electron multiplication: F = 1'
        : 'electron multiplication: variance × F = 2 (excess-noise factor √2 squared)',
    readNoisePhotons: Math.sqrt(inputs.readNoise2),
    backgroundSource: Number.isNaN(inputs.backgroundPhotons) ? 'background column' : 'given',
    backgroundPhotons: Number.isNaN(inputs.backgroundPhotons) ? null : inputs.backgroundPhotons,
    backgroundMeaning: 'background level in photons/pixel, used as b² (DOMAIN.md §1.1)',
  }
}
