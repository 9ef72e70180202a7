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
import type { ParameterValue } from './result'
import { systematicSample } from './sampling'

export interface PrecisionOptions {
  /** Camera pixel size at the sample, nm; needed for expected precision. */
  pixelNm?: number
  /** PSF SD, nm (default: median of the sigma column). */
  psfSigmaNm?: number
  /** Background photons per pixel when the table has no background column. */
  backgroundPhotons?: number
  /** Read noise, photons RMS per pixel; its square is added to b² (sCMOS/CCD; DOMAIN.md §6). */
  readNoisePhotons?: number
  /** 'emccd' selects Mortensen with F = 2; anything else Thompson (default 'unknown'). */
  detector?: 'emccd' | 'scmos' | 'ccd' | 'unknown'
  /** Estimator assumed for Mortensen (default 'mle'). */
  fit?: 'mle' | 'lsq'
  /** Rows sampled for the expected median when the table has its own column (default 65 536). */
  sampleSize?: number
  distribution?: DistributionOptions
}

export const FORMULA_NAMES: Record<PrecisionFormula, string> = {
  thompson: 'Thompson, Larson & Webb 2002',
  'mortensen-mle': 'Mortensen et al. 2010, maximum likelihood',
  'mortensen-lsq': 'Mortensen et al. 2010, least squares',
}

export interface PrecisionInputs {
  pixelNm: number
  psfSigmaNm: number
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
  const psfSigmaNm = options.psfSigmaNm ?? medianOf(table.sigma, table.count)
  if (!(psfSigmaNm !== null && psfSigmaNm > 0 && psfSigmaNm < Infinity)) {
    return 'The PSF width is unknown (no sigma column and none given).'
  }
  const emccd = options.detector === 'emccd'
  const formula = emccd ? (options.fit === 'lsq' ? 'mortensen-lsq' : 'mortensen-mle') : 'thompson'
  const readNoise = options.readNoisePhotons ?? 0
  return {
    pixelNm,
    psfSigmaNm,
    formula,
    excessNoise: excessNoiseOf(options.detector),
    readNoise2: readNoise * readNoise,
    backgroundPhotons: options.backgroundPhotons ?? NaN,
  }
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
  options: PrecisionOptions,
): Record<string, ParameterValue> {
  if (typeof inputs === 'string') return { expected: inputs }
  return {
    formula: FORMULA_NAMES[inputs.formula],
    pixelNm: inputs.pixelNm,
    psfSigmaNm: inputs.psfSigmaNm,
    psfSigmaSource: options.psfSigmaNm === undefined ? 'median of the sigma column' : 'given',
    excessNoise: inputs.excessNoise,
    readNoisePhotons: options.readNoisePhotons ?? 0,
    backgroundSource: Number.isNaN(inputs.backgroundPhotons) ? 'background column' : 'given',
    backgroundPhotons: Number.isNaN(inputs.backgroundPhotons) ? null : inputs.backgroundPhotons,
    backgroundMeaning: 'background level in photons/pixel, used as b² (DOMAIN.md §1.1)',
  }
}
