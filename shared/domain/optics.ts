/**
 * Optics and photon statistics behind the metadata form and the server's checks. Lengths are in nm
 * in sample space, photon counts are detected photoelectrons (DOMAIN.md 1.1–1.5).
 */

function requirePositive(name: string, value: number): void {
  if (!Number.isFinite(value) || value <= 0) {
    throw new RangeError(`${name} must be a positive finite number, got ${value}`)
  }
}

function requireAtLeast(name: string, value: number, min: number): void {
  if (!Number.isFinite(value) || value < min) {
    throw new RangeError(`${name} must be a finite number of at least ${min}, got ${value}`)
  }
}

function requireFinite(name: string, value: number): void {
  if (!Number.isFinite(value)) throw new RangeError(`${name} must be a finite number, got ${value}`)
}

function requireWavelengthAndAperture(emissionNm: number, na: number): void {
  requirePositive('Emission wavelength', emissionNm)
  requirePositive('Numerical aperture', na)
}

/** Abbe's resolution limit, λ/(2 NA). */
export function abbeLimitNm(emissionNm: number, na: number): number {
  requireWavelengthAndAperture(emissionNm, na)
  return emissionNm / (2 * na)
}

/** Rayleigh's criterion, 0.61 λ/NA: the radius of the Airy pattern's first dark ring. */
export function rayleighLimitNm(emissionNm: number, na: number): number {
  requireWavelengthAndAperture(emissionNm, na)
  return (0.61 * emissionNm) / na
}

/**
 * SD of the Gaussian that approximates the in-focus widefield PSF, 0.21 λ/NA (Zhang, Zerubia &
 * Olivo-Marin 2007). The factor 0.21 is quoted from memory; another source uses 0.22.
 */
export function gaussianPsfSigmaNm(emissionNm: number, na: number): number {
  requireWavelengthAndAperture(emissionNm, na)
  return (0.21 * emissionNm) / na
}

/**
 * The same approximation as 1.323/k, k = 2π NA/λ, as a published calculation wrote it: close to
 * the unit-peak Gaussian fitted to the Airy pattern, and within 0.3 % of the 0.21 form.
 */
export function gaussianPsfSigmaAiryFitNm(emissionNm: number, na: number): number {
  requireWavelengthAndAperture(emissionNm, na)
  return (1.323 * emissionNm) / (2 * Math.PI * na)
}

/**
 * Axial diffraction limit 2nλ/NA² (textbook form; DOMAIN.md §6), n the immersion medium's
 * refractive index. 670 nm, NA 1.49, n 1.518 → 916 nm.
 */
export function axialDiffractionLimitNm(emissionNm: number, na: number, n: number): number {
  requireWavelengthAndAperture(emissionNm, na)
  requirePositive('Refractive index', n)
  if (na > n) throw new RangeError(`An NA of ${na} exceeds the refractive index ${n}`)
  return (2 * n * emissionNm) / (na * na)
}

/** Full width at half maximum of a Gaussian of SD `sigma`: 2√(2 ln 2)·σ. */
export function fwhmFromSigma(sigma: number): number {
  requirePositive('Sigma', sigma)
  return 2 * Math.sqrt(2 * Math.LN2) * sigma
}

/**
 * F in the Mortensen formulas, a *variance* factor: electron multiplication doubles the variance
 * (the camera literature's excess-noise factor √2, squared; DOMAIN.md §6).
 */
export const EMCCD_EXCESS_NOISE = 2
export const NO_EXCESS_NOISE = 1

/**
 * Cameras whose gain stage multiplies the noise: EMCCD, intensified and electron-bombarded CCDs
 * (OME detector types). The factor for intensified and electron-bombarded CCDs is taken as the
 * EMCCD's 2, which DOMAIN.md §6 states from memory; tubes vary.
 */
export const EXCESS_NOISE_DETECTORS = ['EMCCD', 'IntensifiedCCD', 'EBCCD'] as const

export function excessNoiseForDetector(type: unknown): number {
  return (EXCESS_NOISE_DETECTORS as readonly unknown[]).includes(type)
    ? EMCCD_EXCESS_NOISE
    : NO_EXCESS_NOISE
}

export interface SpotStatistics {
  /** PSF standard deviation in the sample plane, nm. */
  s: number
  /** Camera pixel size at the sample, nm. */
  a: number
  /** Detected photons in the spot. */
  n: number
  /**
   * Expected background photons per pixel: the background *variance* b², not its SD b.
   * A background of 10 photons/pixel is b2 = 10.
   */
  b2: number
}

export interface NoisySpotStatistics extends SpotStatistics {
  /** Excess-noise factor F: 2 for EMCCD, 1 for sCMOS, CCD or an ideal detector. */
  excessNoise: number
}

function validateSpot({ s, a, n, b2 }: SpotStatistics): void {
  requirePositive('PSF SD s', s)
  requirePositive('Pixel size a', a)
  requirePositive('Photon count N', n)
  requireAtLeast('Background photons per pixel b2', b2, 0)
}

function validateNoisySpot(spot: NoisySpotStatistics): void {
  validateSpot(spot)
  requireAtLeast('Excess-noise factor F', spot.excessNoise, 1)
}

/** s² + a²/12: the PSF variance widened by the pixel's uniform blur (Mortensen et al. 2010). */
function pixelatedVariance(s: number, a: number): number {
  return s * s + (a * a) / 12
}

/** Lateral precision per axis (Thompson, Larson & Webb 2002). */
export function thompsonPrecisionNm(spot: SpotStatistics): number {
  validateSpot(spot)
  const { s, a, n, b2 } = spot
  const variance = pixelatedVariance(s, a) / n + (8 * Math.PI * s ** 4 * b2) / (a * a * n * n)
  return Math.sqrt(variance)
}

/** Lateral precision per axis of an unweighted least-squares fit (Mortensen et al. 2010). */
export function mortensenLsqPrecisionNm(spot: NoisySpotStatistics): number {
  validateNoisySpot(spot)
  const { a, n, b2, excessNoise } = spot
  const sa2 = pixelatedVariance(spot.s, a)
  const variance = excessNoise * (sa2 / n) * (16 / 9 + (8 * Math.PI * sa2 * b2) / (n * a * a))
  return Math.sqrt(variance)
}

/** Lateral precision per axis of a maximum-likelihood fit (Mortensen et al. 2010). */
export function mortensenMlePrecisionNm(spot: NoisySpotStatistics): number {
  validateNoisySpot(spot)
  const { a, n, b2, excessNoise } = spot
  const sa2 = pixelatedVariance(spot.s, a)
  const tau = (2 * Math.PI * sa2 * b2) / (n * a * a)
  return Math.sqrt((excessNoise * (sa2 / n)) / mleInformationFactor(tau))
}

// Five-point Gauss–Legendre rule on [−1, 1] in closed form (Abramowitz & Stegun 25.4.30).
const GL_OUTER = Math.sqrt(5 + 2 * Math.sqrt(10 / 7)) / 3
const GL_INNER = Math.sqrt(5 - 2 * Math.sqrt(10 / 7)) / 3
const GL_NODES = [-GL_OUTER, -GL_INNER, 0, GL_INNER, GL_OUTER]
const GL_WEIGHTS = [
  (322 - 13 * Math.sqrt(70)) / 900,
  (322 + 13 * Math.sqrt(70)) / 900,
  128 / 225,
  (322 + 13 * Math.sqrt(70)) / 900,
  (322 - 13 * Math.sqrt(70)) / 900,
]

/** ∫ f over [from, to] by the five-point rule on panels at most `width` wide. */
export function integrateGaussLegendre(
  f: (u: number) => number,
  from: number,
  to: number,
  width: number,
): number {
  const panels = Math.max(1, Math.ceil((to - from) / width))
  const half = (to - from) / panels / 2
  let sum = 0
  for (let p = 0; p < panels; p++) {
    const centre = from + (2 * p + 1) * half
    GL_NODES.forEach((node, i) => (sum += (GL_WEIGHTS[i] ?? 0) * f(centre + half * node)))
  }
  return sum * half
}

// Past the integrand's knee it falls as e^(−2u): 40 more units leave a tail below 1e-30.
const TAIL_SPAN = 40
const PANEL_WIDTH = 0.5

/**
 * 1 + ∫₀¹ ln t /(1 + t/τ) dt, the denominator of the MLE variance. As ∫₀¹ ln t dt = −1, it equals
 * ∫₀¹ (−ln t)·t/(t + τ) dt: a positive integrand, so nothing cancels when τ is large and the
 * value nears 1/(4τ). t = e^(−u) turns the log singularity at t = 0 into the smooth integrand
 * u·e^(−u)/(1 + τe^u) on [0, ∞), with a logistic knee at u = ln(1/τ) whose poles lie π off the
 * real axis; five-point Gauss–Legendre on half-unit panels then converges geometrically (about
 * 1e-11 relative for every τ from 1e-300 to 1e15). τ = 0 (no background) gives exactly 1.
 */
export function mleInformationFactor(tau: number): number {
  requireAtLeast('tau', tau, 0)
  if (tau === 0) return 1
  const logTau = Math.log(tau)
  const end = Math.max(0, -logTau) + TAIL_SPAN
  return integrateGaussLegendre(
    (u) => (u * Math.exp(-u)) / (1 + Math.exp(u + logTau)),
    0,
    end,
    PANEL_WIDTH,
  )
}

export interface CameraReading {
  /** Pixel value in analogue-to-digital units. */
  adu: number
  /** Dark level in ADU. */
  offset: number
  /** Electrons per ADU at unity EM gain. */
  conversionFactor: number
  /** EM gain; 1 for CMOS and CCD cameras. */
  emGain: number
}

/** (ADU − offset)·c/G_EM: detected photoelectrons (DOMAIN.md 1.3). */
export function countsToElectrons(reading: CameraReading): number {
  const { adu, offset, conversionFactor, emGain } = reading
  requireFinite('ADU', adu)
  requireFinite('Offset', offset)
  requirePositive('Conversion factor', conversionFactor)
  requireAtLeast('EM gain', emGain, 1)
  return ((adu - offset) * conversionFactor) / emGain
}

/** Photons that reached the sensor: electrons divided by the quantum efficiency (0–1]. */
export function electronsToPhotons(electrons: number, quantumEfficiency: number): number {
  requireFinite('Electrons', electrons)
  requirePositive('Quantum efficiency', quantumEfficiency)
  if (quantumEfficiency > 1) throw new RangeError('Quantum efficiency is a fraction of at most 1')
  return electrons / quantumEfficiency
}

/**
 * Objective × tube or relay lens (DOMAIN.md §6: 100× with a 1.5× tube lens is 150×); the
 * objective's nominal magnification alone when no tube lens is given.
 */
export function totalMagnification(objective: number, tubeLens?: number | null): number {
  requirePositive('Objective magnification', objective)
  if (tubeLens === undefined || tubeLens === null) return objective
  requirePositive('Tube or relay lens magnification', tubeLens)
  return objective * tubeLens
}

/** Camera pixel projected onto the sample: physical pixel (µm) / total magnification, in nm. */
export function pixelSizeAtSampleNm(cameraPixelUm: number, totalMagnification: number): number {
  requirePositive('Camera pixel size', cameraPixelUm)
  requirePositive('Total magnification', totalMagnification)
  return (cameraPixelUm * 1000) / totalMagnification
}

/** Where a pixel size at the sample came from. */
export type PixelSource = 'description' | 'total magnification' | 'objective magnification'

export interface PixelDescription {
  /** The pixel at the sample as described, nm. */
  pixelNm?: number | null
  /** The camera pixel on the chip, µm, and the objective's and tube lens's magnifications. */
  chipPixelUm?: number | null
  objective?: number | null
  tubeLens?: number | null
}

const given = (v: number | null | undefined): v is number =>
  typeof v === 'number' && Number.isFinite(v) && v > 0

/**
 * The pixel at the sample: as described, else the chip pixel over the total magnification
 * (objective × tube lens, DOMAIN.md §6), else over the objective alone; null when unknown.
 */
export function pixelAtSample(d: PixelDescription): {
  pixelNm: number
  pixelSource: PixelSource
} | null {
  if (given(d.pixelNm)) return { pixelNm: d.pixelNm, pixelSource: 'description' }
  if (!given(d.chipPixelUm) || !given(d.objective)) return null
  const tube = given(d.tubeLens) ? d.tubeLens : null
  return {
    pixelNm: pixelSizeAtSampleNm(d.chipPixelUm, totalMagnification(d.objective, tube)),
    pixelSource: tube === null ? 'objective magnification' : 'total magnification',
  }
}

export type Dimensions = 1 | 2 | 3

/** Least density (per nm^D) of distinct molecules for resolution R: (2/R)^D (Shroff et al. 2008). */
export function nyquistDensity(resolutionNm: number, dims: Dimensions): number {
  requirePositive('Resolution', resolutionNm)
  return (2 / resolutionNm) ** dims
}

/** The Nyquist density per µm^D (per µm, µm² or µm³). */
export function nyquistDensityPerUm(resolutionNm: number, dims: Dimensions): number {
  return nyquistDensity(resolutionNm, dims) * 1000 ** dims
}

export const nyquistDensityPerUm2 = (resolutionNm: number): number =>
  nyquistDensityPerUm(resolutionNm, 2)
export const nyquistDensityPerUm3 = (resolutionNm: number): number =>
  nyquistDensityPerUm(resolutionNm, 3)

/** The OME Objective Immersion enumeration (schema 2016-06). */
export const IMMERSIONS = [
  'Oil',
  'Water',
  'WaterDipping',
  'Air',
  'Multi',
  'Glycerol',
  'Other',
] as const
export type Immersion = (typeof IMMERSIONS)[number]

/**
 * Refractive index of each immersion medium near 589 nm and room temperature. Handbook values:
 * water 1.333, air 1.000 (1.0003), glycerol 1.47 (anhydrous glycerol 1.474; from memory). Oil
 * 1.518 is the standard immersion oil of common practice. A multi-immersion objective is checked
 * against the densest medium it may take (oil); 'Other' has no known index, so nothing is checked.
 */
export const IMMERSION_REFRACTIVE_INDEX: Readonly<Record<Immersion, number | null>> = {
  Oil: 1.518,
  Water: 1.333,
  WaterDipping: 1.333,
  Air: 1.0,
  Multi: 1.518,
  Glycerol: 1.47,
  Other: null,
}

/** NA = n·sin θ cannot exceed the medium's index n; null when the medium is unknown. */
export function maxNumericalAperture(immersion: Immersion): number | null {
  return IMMERSION_REFRACTIVE_INDEX[immersion]
}

/**
 * The refractive index an NA is checked against: the medium's own when the description gives it
 * (high-index media reach n ≈ 1.78, objectives NA 1.7), else the table above by immersion.
 */
export function immersionIndexOf(immersion: Immersion | undefined, n?: number): number | null {
  if (n !== undefined && Number.isFinite(n) && n >= 1) return n
  return immersion ? maxNumericalAperture(immersion) : null
}

/** A message when the NA is impossible for the immersion medium, else null. */
export function numericalApertureProblem(
  na: number,
  immersion: Immersion,
  refractiveIndex?: number,
): string | null {
  if (!Number.isFinite(na) || na <= 0) return 'The numerical aperture must be a positive number'
  const max = immersionIndexOf(immersion, refractiveIndex)
  if (max !== null && na > max) {
    return `An NA of ${na} is impossible with immersion ${immersion} (n = ${max})`
  }
  return null
}
