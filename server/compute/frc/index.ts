/**
 * FRC area: Fourier ring correlation resolution of a localization table (Nieuwenhuizen et al. 2013)
 * with time-block halves, LOESS smoothing, the 1/7 threshold and the spurious-correlation correction.
 */
export { computeFrc } from './compute-frc'
export { FRC_METHOD } from './frc-result'
export { FRC_DEFAULTS } from './frc-options'
export { FRC_THRESHOLD } from './threshold'
export type { FrcCurve, FrcOptions, FrcParameters, FrcResult } from './frc.types'
