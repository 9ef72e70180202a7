import { z } from 'zod'
import { field } from './field'
import { quantity, text } from './quantities'

export const FITTING_MODELS = [
  '2D Gaussian',
  'elliptical Gaussian',
  'integrated Gaussian',
  'experimental PSF (spline)',
  'other',
] as const
export const ESTIMATORS = [
  'least squares',
  'weighted least squares',
  'maximum likelihood',
  'other',
] as const
export const DRIFT_METHODS = [
  'none',
  'fiducial markers',
  'cross-correlation',
  'redundant cross-correlation',
  'other',
] as const

/** How localizations were obtained from the raw frames. Software names are free text. */
export const processingSchema = z.object({
  software: field(text('Software', 200), {
    tier: 'required',
    label: 'Localization software',
    suggest: true,
  }),
  softwareVersion: field(text('Version', 50), { tier: 'required', label: 'Software version' }),
  fittingModel: field(z.enum(FITTING_MODELS), { tier: 'required', label: 'PSF model' }),
  estimator: field(z.enum(ESTIMATORS), { tier: 'required', label: 'Estimator' }),
  fittedPsfSigmaNm: field(quantity('Fitted PSF width', 'nm', 0, 1000, { exclusiveMin: true }), {
    tier: 'optional',
    label: 'Fitted PSF width (σ)',
    unit: 'nm',
    help: 'Typical standard deviation of the fitted spots, at the sample; real PSFs are 100–150 nm',
  }),
  driftCorrection: field(z.enum(DRIFT_METHODS), { tier: 'required', label: 'Drift correction' }),
  driftDetails: field(text('Drift details', 1000), {
    tier: 'optional',
    label: 'Drift correction details',
    help: 'e.g. segments of 1000 frames, 30 nm render pixel',
    multiline: true,
  }),
  filtering: field(text('Filtering', 1000), {
    tier: 'recommended',
    label: 'Filtering',
    help: 'Thresholds on photons, uncertainty, PSF width …',
    multiline: true,
  }),
  mergingRadiusNm: field(quantity('Merging radius', 'nm', 0, 1000), {
    tier: 'optional',
    label: 'Merging radius',
    unit: 'nm',
  }),
  mergingMaxDarkFrames: field(quantity('Dark frames', 'frames', 0, 10_000, { int: true }), {
    tier: 'optional',
    label: 'Merging: dark frames allowed',
    unit: 'frames',
  }),
  uncertaintyFormula: field(text('Uncertainty formula', 200), {
    tier: 'optional',
    label: 'Uncertainty column computed by',
    help: 'e.g. Thompson 2002, Mortensen 2010, CRLB from the fit',
  }),
})
export type ProcessingMetadata = z.infer<typeof processingSchema>
