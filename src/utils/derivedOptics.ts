import {
  abbeLimitNm,
  countsToElectrons,
  electronsToPhotons,
  EMCCD_EXCESS_NOISE,
  gaussianPsfSigmaNm,
  mortensenLsqPrecisionNm,
  mortensenMlePrecisionNm,
  NO_EXCESS_NOISE,
  rayleighLimitNm,
  thompsonPrecisionNm,
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
  pixelNm: unknown
  detectorType: unknown
  /** Detected photons in a typical spot. */
  photons: unknown
  /** Background photons per pixel, i.e. the variance b² (not its SD). */
  background: unknown
}

export interface ExpectedPrecision {
  psfSigmaNm: number
  pixelNm: number
  excessNoise: number
  thompsonNm: number
  lsqNm: number
  mleNm: number
}

/** Lateral precision of a typical spot by Thompson 2002 and Mortensen 2010 (LSQ and MLE). */
export function expectedPrecision(inputs: PrecisionInputs): ExpectedPrecision | null {
  const lambda = positive(inputs.emissionNm)
  const na = positive(inputs.na)
  const a = positive(inputs.pixelNm)
  const n = positive(inputs.photons)
  const b2 = inputs.background
  if (lambda === null || na === null || a === null || n === null) return null
  if (typeof b2 !== 'number' || !Number.isFinite(b2) || b2 < 0) return null
  const s = gaussianPsfSigmaNm(lambda, na)
  // Only EM gain multiplies the noise; sCMOS and CCD cameras count as ideal (Mortensen 2010).
  const excessNoise = inputs.detectorType === 'EMCCD' ? EMCCD_EXCESS_NOISE : NO_EXCESS_NOISE
  const spot = { s, a, n, b2, excessNoise }
  return {
    psfSigmaNm: s,
    pixelNm: a,
    excessNoise,
    thompsonNm: thompsonPrecisionNm(spot),
    lsqNm: mortensenLsqPrecisionNm(spot),
    mleNm: mortensenMlePrecisionNm(spot),
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
