import { z } from 'zod'
import { field } from './field'
import { quantity, text, wavelengthNm } from './quantities'

export const SMLM_TECHNIQUES = [
  'dSTORM',
  'STORM',
  'PALM',
  'DNA-PAINT',
  'Exchange-PAINT',
  'other PAINT',
  'other',
] as const
export const ILLUMINATIONS = ['TIRF', 'HILO', 'epifluorescence', 'light sheet', 'other'] as const
export const THREE_D_METHODS = [
  'none (2D)',
  'astigmatism',
  'biplane',
  'engineered PSF',
  'interferometric',
  'other',
] as const

/** REMBI "Image acquisition" for an SMLM experiment. */
export const acquisitionSchema = z.object({
  technique: field(z.enum(SMLM_TECHNIQUES), {
    tier: 'required',
    label: 'SMLM technique',
    term: 'OME Channel@AcquisitionMode',
  }),
  illumination: field(z.enum(ILLUMINATIONS), {
    tier: 'required',
    label: 'Illumination',
    term: 'OME Channel@IlluminationType',
  }),
  emissionWavelengthNm: field(wavelengthNm('Emission wavelength'), {
    tier: 'recommended',
    label: 'Emission wavelength',
    unit: 'nm',
    help: 'Peak emission; used for the diffraction limit and PSF width shown beside',
    term: 'OME Channel@EmissionWavelength',
  }),
  frames: field(quantity('Frames', 'frames', 1, 1e8, { int: true }), {
    tier: 'required',
    label: 'Frames',
    unit: 'frames',
    term: 'OME Pixels@SizeT',
  }),
  exposureTimeMs: field(quantity('Exposure time', 'ms', 0, 1e6, { exclusiveMin: true }), {
    tier: 'required',
    label: 'Exposure time',
    unit: 'ms',
    term: 'OME Plane@ExposureTime',
  }),
  frameIntervalMs: field(quantity('Frame interval', 'ms', 0, 1e7, { exclusiveMin: true }), {
    tier: 'optional',
    label: 'Frame interval',
    unit: 'ms',
    term: 'OME Pixels@TimeIncrement',
  }),
  imagingBuffer: field(text('Imaging buffer', 1000), {
    tier: 'recommended',
    label: 'Imaging buffer',
    help: 'e.g. thiol and oxygen scavenging system in Tris, pH 8',
    suggest: true,
  }),
  temperatureC: field(quantity('Temperature', '°C', -80, 80), {
    tier: 'optional',
    label: 'Temperature',
    unit: '°C',
  }),
  threeDMethod: field(z.enum(THREE_D_METHODS), { tier: 'optional', label: '3D method' }),
  activation: field(text('Activation scheme', 500), {
    tier: 'optional',
    label: 'Activation scheme',
    help: 'e.g. 405 nm ramped to keep density constant',
  }),
})
export type AcquisitionMetadata = z.infer<typeof acquisitionSchema>
