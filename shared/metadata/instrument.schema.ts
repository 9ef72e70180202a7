import { z } from 'zod'
import { field, group } from './field'
import {
  OME_CORRECTIONS,
  OME_DETECTOR_TYPES,
  OME_IMMERSIONS,
  OME_LASER_PULSES,
  OME_LASER_TYPES,
  OME_LIGHT_SOURCE_KINDS,
  OME_MICROSCOPE_TYPES,
} from './ome-terms'
import { quantity, text, wavelengthNm } from './quantities'

export const objectiveSchema = z.object({
  model: field(text('Model', 200), {
    tier: 'optional',
    label: 'Objective model',
    suggest: true,
    term: 'OME Objective@Model',
  }),
  nominalMagnification: field(quantity('Magnification', '×', 1, 250), {
    tier: 'required',
    label: 'Nominal magnification',
    unit: '×',
    term: 'OME Objective@NominalMagnification',
  }),
  lensNA: field(quantity('Numerical aperture', '', 0.02, 1.7), {
    tier: 'required',
    label: 'Numerical aperture (NA)',
    term: 'OME Objective@LensNA',
  }),
  immersion: field(z.enum(OME_IMMERSIONS), {
    tier: 'required',
    label: 'Immersion',
    term: 'OME Objective@Immersion',
  }),
  immersionRefractiveIndex: field(quantity('Refractive index', '', 1, 2.5), {
    tier: 'optional',
    label: 'Refractive index of the immersion medium',
    help: 'Checks the NA when it is not the usual medium (oil 1.518); high-index media reach 1.78',
    term: 'OME ObjectiveSettings@RefractiveIndex',
  }),
  tubeLensMagnification: field(quantity('Tube or relay lens magnification', '×', 0.1, 10), {
    tier: 'optional',
    label: 'Tube or relay lens magnification',
    unit: '×',
    help: 'Extra magnification after the objective, e.g. 1.5×: total = objective × this',
  }),
  correction: field(z.enum(OME_CORRECTIONS), {
    tier: 'optional',
    label: 'Correction',
    term: 'OME Objective@Correction',
  }),
})

export const lightSourceSchema = z.object({
  kind: field(z.enum(OME_LIGHT_SOURCE_KINDS), {
    tier: 'required',
    label: 'Kind',
    term: 'OME LightSource',
  }),
  laserType: field(z.enum(OME_LASER_TYPES), {
    tier: 'optional',
    label: 'Laser type',
    term: 'OME Laser@Type',
  }),
  pulse: field(z.enum(OME_LASER_PULSES), {
    tier: 'optional',
    label: 'Pulse',
    term: 'OME Laser@Pulse',
  }),
  wavelengthNm: field(wavelengthNm('Wavelength'), {
    tier: 'required',
    label: 'Wavelength',
    unit: 'nm',
    term: 'OME Laser@Wavelength',
  }),
  powerMw: field(quantity('Power', 'mW', 0, 100_000), {
    tier: 'recommended',
    label: 'Power',
    unit: 'mW',
    term: 'OME LightSource@Power',
  }),
  irradianceWPerCm2: field(quantity('Irradiance', 'W/cm²', 0, 1e7), {
    tier: 'recommended',
    label: 'Irradiance at the sample',
    unit: 'W/cm²',
    help: 'dSTORM typically 1–10 kW/cm², i.e. 1 000–10 000 W/cm²',
  }),
  role: field(z.enum(['excitation', 'activation', 'other']), {
    tier: 'optional',
    label: 'Used for',
  }),
})

export const detectorSchema = z.object({
  type: field(z.enum(OME_DETECTOR_TYPES), {
    tier: 'required',
    label: 'Detector type',
    help: 'sCMOS cameras are CMOS in the OME vocabulary',
    term: 'OME Detector@Type',
  }),
  model: field(text('Model', 200), {
    tier: 'optional',
    label: 'Camera model',
    suggest: true,
    term: 'OME Detector@Model',
  }),
  physicalPixelSizeUm: field(quantity('Camera pixel size', 'µm', 0, 100, { exclusiveMin: true }), {
    tier: 'recommended',
    label: 'Camera pixel size (on the chip)',
    unit: 'µm',
  }),
  pixelSizeNm: field(
    quantity('Pixel size at the sample', 'nm', 0, 10_000, { exclusiveMin: true }),
    {
      tier: 'required',
      label: 'Pixel size at the sample',
      unit: 'nm',
      help: 'Camera pixel divided by the total magnification, e.g. 16 µm / 100× = 160 nm',
      term: 'OME Pixels@PhysicalSizeX',
    },
  ),
  offsetAdu: field(quantity('Camera offset', 'ADU', 0, 1e6), {
    tier: 'recommended',
    label: 'Camera offset',
    unit: 'ADU',
    term: 'OME Detector@Offset',
  }),
  conversionFactor: field(
    quantity('Conversion factor', 'e⁻/ADU', 0, 1000, { exclusiveMin: true }),
    {
      tier: 'recommended',
      label: 'Conversion factor',
      unit: 'e⁻/ADU',
      help: 'Photoelectrons per count',
    },
  ),
  conversionFactorConvention: field(z.enum(['at unity EM gain', 'after EM gain']), {
    tier: 'optional',
    label: 'Conversion factor measured',
    help: 'Some makers quote the factor after EM gain (≈0.03 e⁻/ADU at high gain)',
  }),
  emGain: field(quantity('EM gain', '×', 1, 10_000), {
    tier: 'optional',
    label: 'EM gain',
    unit: '×',
    term: 'OME Detector@AmplificationGain',
  }),
  quantumEfficiency: field(quantity('Quantum efficiency', 'fraction', 0, 1), {
    tier: 'optional',
    label: 'Quantum efficiency',
    unit: 'fraction',
  }),
  readNoiseE: field(quantity('Read noise', 'e⁻', 0, 1000), {
    tier: 'optional',
    label: 'Read noise',
    unit: 'e⁻',
  }),
})

/** The OME Instrument: microscope, objective, light sources and detector. Labs can save it for reuse. */
export const instrumentSchema = z.object({
  microscopeType: field(z.enum(OME_MICROSCOPE_TYPES), {
    tier: 'recommended',
    label: 'Microscope stand',
    term: 'OME Microscope@Type',
  }),
  microscopeModel: field(text('Microscope', 200), {
    tier: 'optional',
    label: 'Microscope model',
    suggest: true,
    term: 'OME Microscope@Model',
  }),
  objective: field(objectiveSchema, {
    tier: 'required',
    label: 'Objective',
    term: 'OME Objective',
  }),
  lightSources: group(z.array(lightSourceSchema).max(20), {
    tier: 'required',
    label: 'Light sources',
    term: 'OME LightSource',
  }),
  detector: field(detectorSchema, { tier: 'required', label: 'Detector', term: 'OME Detector' }),
})
export type InstrumentMetadata = z.infer<typeof instrumentSchema>
