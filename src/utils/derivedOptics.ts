import {
  abbeLimitNm,
  axialDiffractionLimitNm,
  countsToElectrons,
  electronsToPhotons,
  excessNoiseForDetector,
  gaussianPsfSigmaNm,
  IMMERSIONS,
  immersionIndexOf,
  mortensenLsqPrecisionNm,
  mortensenMlePrecisionNm,
  pixelAtSample,
  rayleighLimitNm,
  thompsonPrecisionNm,
  type Immersion,
  type PixelSource,
} from '@shared/domain/optics'

/** A form value as a positive finite number, or null while it is missing or still being typed. */
export function positive(value: unknown): number | null {
  return typeof value === 'number' && Number.isFinite(value) && value > 0 ? value : null
}

export interface DiffractionLimits {
  abbeNm: number
  rayleighNm: number
}

export function diffractionLimits(emissionNm: unknown, na: unknown): DiffractionLimits | null {
  const lambda = positive(emissionNm)
  const aperture = positive(na)
  if (lambda === null || aperture === null) return null
  return { abbeNm: abbeLimitNm(lambda, aperture), rayleighNm: rayleighLimitNm(lambda, aperture) }
}

export interface PrecisionInputs {
  emissionNm: unknown
  na: unknown
  /** Pixel at the sample as described (instrument.detector.pixelSizeNm). */
  pixelNm: unknown
  detectorType: unknown
  /** Detected photons in a typical spot. */
  photons: unknown
  /** Background photons per pixel, i.e. the variance b² (not its SD). */
  background: unknown
  /** Median fitted PSF SD of a deposited table, nm. */
  measuredPsfSigmaNm?: unknown
  /** The description's fitted PSF SD (processing.fittedPsfSigmaNm), nm. */
  fittedPsfSigmaNm?: unknown
  /** Read noise, e⁻ RMS per pixel; added (squared) to b² unless EM gain hides it. */
  readNoiseE?: unknown
  /** Camera pixel on the chip (µm), objective and tube/relay magnification. */
  chipPixelUm?: unknown
  nominalMagnification?: unknown
  tubeLensMagnification?: unknown
  immersion?: unknown
  refractiveIndex?: unknown
}

/** Where the PSF width comes from: a table, the description, or the ideal (a lower bound). */
export type PsfSource = 'table' | 'description' | 'ideal'

export interface ExpectedPrecision {
  psfSigmaNm: number
  psfSource: PsfSource
  pixelNm: number
  /** `total magnification`: chip pixel ÷ (objective × tube lens), when no pixel size is given. */
  pixelSource: PixelSource
  /** Variance factor F applied to every row: 2 with electron multiplication, else 1. */
  excessNoise: number
  /** Read noise added to b² (e⁻ = photoelectrons), 0 when none applies. */
  readNoiseE: number
  thompsonNm: number
  lsqNm: number
  mleNm: number
  /** Axial diffraction limit 2nλ/NA², when the medium's index is known. */
  axialLimitNm: number | null
}

function psfOf(inputs: PrecisionInputs, lambda: number, na: number) {
  const measured = positive(inputs.measuredPsfSigmaNm)
  if (measured !== null) return { psfSigmaNm: measured, psfSource: 'table' as const }
  const fitted = positive(inputs.fittedPsfSigmaNm)
  if (fitted !== null) return { psfSigmaNm: fitted, psfSource: 'description' as const }
  return { psfSigmaNm: gaussianPsfSigmaNm(lambda, na), psfSource: 'ideal' as const }
}

/** The described pixel size, else the chip pixel over the total magnification (DOMAIN.md §6). */
const pixelOf = (inputs: PrecisionInputs) =>
  pixelAtSample({
    pixelNm: positive(inputs.pixelNm),
    chipPixelUm: positive(inputs.chipPixelUm),
    objective: positive(inputs.nominalMagnification),
    tubeLens: positive(inputs.tubeLensMagnification),
  })

function axialLimitOf(inputs: PrecisionInputs, lambda: number, na: number): number | null {
  const immersion = (IMMERSIONS as readonly unknown[]).includes(inputs.immersion)
    ? (inputs.immersion as Immersion)
    : undefined
  const n = immersionIndexOf(immersion, positive(inputs.refractiveIndex) ?? undefined)
  return n !== null && na <= n ? axialDiffractionLimitNm(lambda, na, n) : null
}

/**
 * Lateral precision of a typical spot by Thompson 2002 and Mortensen 2010 (LSQ and MLE), with
 * the PSF width a table measured, else the described one, else the ideal 0.21 λ/NA (a lower
 * bound: fitted PSFs are 100–150 nm where the ideal is ≈ 94, DOMAIN.md §6). Electron
 * multiplication doubles every variance, Thompson's too; read noise adds to b² (CMOS, CCD).
 */
export function expectedPrecision(inputs: PrecisionInputs): ExpectedPrecision | null {
  const lambda = positive(inputs.emissionNm)
  const na = positive(inputs.na)
  const pixel = pixelOf(inputs)
  const n = positive(inputs.photons)
  const background = inputs.background
  if (lambda === null || na === null || pixel === null || n === null) return null
  if (typeof background !== 'number' || !Number.isFinite(background) || background < 0) return null
  const psf = psfOf(inputs, lambda, na)
  const excessNoise = excessNoiseForDetector(inputs.detectorType)
  // Electron multiplication makes the read noise negligible; CMOS and CCD add it to b².
  const readNoiseE = excessNoise === 1 ? (positive(inputs.readNoiseE) ?? 0) : 0
  const b2 = background + readNoiseE ** 2
  const spot = { s: psf.psfSigmaNm, a: pixel.pixelNm, n, b2, excessNoise }
  return {
    ...psf,
    ...pixel,
    excessNoise,
    readNoiseE,
    thompsonNm: thompsonPrecisionNm(spot) * Math.sqrt(excessNoise),
    lsqNm: mortensenLsqPrecisionNm(spot),
    mleNm: mortensenMlePrecisionNm(spot),
    axialLimitNm: axialLimitOf(inputs, lambda, na),
  }
}

export interface CameraInputs {
  adu: unknown
  offset: unknown
  conversionFactor: unknown
  emGain: unknown
  detectorType: unknown
  /** 'after EM gain' when the maker quotes e⁻/ADU with the gain already applied. */
  convention: unknown
  quantumEfficiency: unknown
}

export interface CameraReadout {
  electrons: number
  /** Photons that reached the sensor (electrons ÷ QE), when the QE is known. */
  incidentPhotons: number | null
}

const finite = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v)

/**
 * A pixel value in ADU as photoelectrons (DOMAIN.md 1.3), and as incident photons when the QE is
 * known; otherwise the names of the camera values still needed.
 */
export function cameraReadout(inputs: CameraInputs): CameraReadout | { missing: string[] } {
  const c = positive(inputs.conversionFactor)
  // A factor measured after EM gain already includes it; CMOS and CCD cameras have no EM gain.
  const gainApplies = inputs.detectorType === 'EMCCD' && inputs.convention !== 'after EM gain'
  const gain = gainApplies ? positive(inputs.emGain) : 1
  const missing = [
    ...(finite(inputs.adu) ? [] : ['a pixel value']),
    ...(finite(inputs.offset) ? [] : ['the camera offset']),
    ...(c === null ? ['the conversion factor'] : []),
    ...(gain === null || gain < 1 ? ['the EM gain'] : []),
  ]
  if (!finite(inputs.adu) || !finite(inputs.offset) || c === null || gain === null || gain < 1) {
    return { missing }
  }
  const electrons = countsToElectrons({
    adu: inputs.adu,
    offset: inputs.offset,
    conversionFactor: c,
    emGain: gain,
  })
  const qe = positive(inputs.quantumEfficiency)
  return {
    electrons,
    incidentPhotons: qe !== null && qe <= 1 ? electronsToPhotons(electrons, qe) : null,
  }
}

/** A length for display: one decimal, with its unit. */
export const formatNm = (value: number) => `${value.toFixed(1)} nm`
