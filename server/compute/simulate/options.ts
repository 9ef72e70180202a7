/**
 * What the simulator takes, with the defaults it fills in. Defaults describe a plausible dSTORM-like
 * acquisition of microtubule-like filaments (DOMAIN.md §2 magnitudes): 10 µm field, 20 000 emitters,
 * 10 000 frames, far-red-dye photon counts, sCMOS pixel of 108 nm.
 */

/** Emitters spread evenly over the field. */
export interface UniformStructure {
  kind: 'uniform'
  /** Share of the channel's emitters in this structure when several are mixed (default 1). */
  weight?: number
}

/** Random smooth curves (worm-like chains) labelled on the surface of a hollow tube. */
export interface FilamentStructure {
  kind: 'filaments'
  weight?: number
  /** Number of curves (default 15). */
  count?: number
  /** Outer tube diameter, nm (default 25, a microtubule). */
  diameterNm?: number
  /** Persistence length of the curves, nm (default 4000: gently bending at the field's scale). */
  persistenceNm?: number
}

/** Rings with n-fold symmetric labelling sites, loosely like nuclear-pore rings. */
export interface RingStructure {
  kind: 'rings'
  weight?: number
  /** Number of rings (default: emitters / sites, so sites are labelled ~once on average). */
  count?: number
  /** Ring radius, nm (default 50). */
  radiusNm?: number
  /** Labelling sites per ring (default 8). */
  sites?: number
  /** SD of each label about its site, nm (default 2). */
  siteSpreadNm?: number
}

/** Gaussian clusters at uniformly random centres. */
export interface ClusterStructure {
  kind: 'clusters'
  weight?: number
  /** Number of clusters (default 100). */
  count?: number
  /** Cluster radius: the SD of the Gaussian, nm (default 30). */
  radiusNm?: number
}

export type Structure = UniformStructure | FilamentStructure | RingStructure | ClusterStructure

/** One channel: a structure (or a weighted mix) and how many emitters label it. */
export interface ChannelOptions {
  structure: Structure | Structure[]
  emitters?: number
  /** Emitters per µm² of field, used when `emitters` is not given. */
  densityPerUm2?: number
}

export type Blinking =
  | {
      mode: 'bursts'
      /** Mean number of bursts per emitter, ≥ 1: each emitter gives 1 + Poisson(mean − 1). */
      meanBursts?: number
      /** Mean burst length in consecutive frames (geometric, ≥ 1). */
      meanBurstFrames?: number
      /**
       * When set, burst starts follow an exponential decay over the run with this mean (frames):
       * an activation/bleaching curve. Otherwise starts are uniform over the run.
       */
      decayFrames?: number
    }
  | { mode: 'single' }

export type Precision =
  /** Per-localization precision from photons, background, PSF and pixel (Thompson 2002). */
  | { mode: 'thompson' }
  /** The same precision for every localization, nm. */
  | { mode: 'fixed'; sigmaNm: number }

export interface DriftPoint {
  x: number
  y: number
}

/** Linear drift over the whole run plus a sinusoid, nm. */
export interface DriftParameters {
  linearNm?: DriftPoint
  sinusoidAmplitudeNm?: DriftPoint
  /** Period of the sinusoid, frames (default: the run length). */
  sinusoidPeriodFrames?: number
}

export interface AxialOptions {
  /** Axial range of the sample, nm (default [−400, 400]). */
  rangeNm?: [number, number]
  /** Axial precision as a multiple of the lateral one (default 2.5, astigmatic-like). */
  axialFactor?: number
}

export interface SimulationOptions {
  /** Seed of the random stream (default 1); the same options and seed give the same table. */
  seed?: number
  /** Side of the square field, nm (default 10 000). */
  fieldNm?: number
  /** Single-channel structure (default filaments); ignored when `channels` is given. */
  structure?: Structure | Structure[]
  /** Emitter count of the single channel (default 20 000). */
  emitters?: number
  /** Emitters per µm² of field, used when `emitters` is not given. */
  densityPerUm2?: number
  /** Two or more channels, each with its own structure; adds a `channel` column. */
  channels?: ChannelOptions[]
  /** Frames in the run (default 10 000). */
  frames?: number
  /** Default: bursts, 3 per emitter, 2 frames each, starts uniform over the run. */
  blinking?: Blinking
  /** Median detected photons per localization (default 1500), log-normal. */
  photonsMedian?: number
  /** Log-normal shape (SD of ln photons; default 0.5). */
  photonsSpread?: number
  /** Background level, photons per pixel (default 10); varies 10 % (log-normal) per localization. */
  backgroundPhotons?: number
  /** PSF SD in the sample plane, nm (default 130); fitted widths vary 5 % per localization. */
  psfSigmaNm?: number
  /** Camera pixel at the sample, nm (default 108). */
  pixelNm?: number
  /** Default thompson. */
  precision?: Precision
  drift?: ((frame: number) => DriftPoint) | DriftParameters
  /** Adds z: emitters spread over the range, axial error a multiple of the lateral one. */
  axial?: AxialOptions
  /**
   * Label-to-target distance, nm (DOMAIN.md §1.12; default 0): each emitter sits this far from
   * its target site in a uniformly random 3D direction (projected onto the plane in 2D).
   */
  linkageNm?: number
}

export const SIMULATION_DEFAULTS = {
  seed: 1,
  fieldNm: 10_000,
  emitters: 20_000,
  frames: 10_000,
  meanBursts: 3,
  meanBurstFrames: 2,
  photonsMedian: 1500,
  photonsSpread: 0.5,
  backgroundPhotons: 10,
  backgroundSpread: 0.1,
  psfSigmaNm: 130,
  psfSigmaSpread: 0.05,
  pixelNm: 108,
  axialRangeNm: [-400, 400] as [number, number],
  axialFactor: 2.5,
  linkageNm: 0,
  filamentCount: 15,
  filamentDiameterNm: 25,
  filamentPersistenceNm: 4000,
  ringRadiusNm: 50,
  ringSites: 8,
  ringSiteSpreadNm: 2,
  clusterCount: 100,
  clusterRadiusNm: 30,
} as const

export const DEFAULT_STRUCTURE: Structure = { kind: 'filaments' }
