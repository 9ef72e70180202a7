/**
 * Enumerations of the OME data model, schema release 2016-06, as the XSD defines them.
 * tests/unit/metadata/ome-terms.test.ts reads them back out of the official ome.xsd.
 */
export const OME_MICROSCOPE_TYPES = [
  'Upright',
  'Inverted',
  'Dissection',
  'Electrophysiology',
  'Other',
] as const
export const OME_IMMERSIONS = [
  'Oil',
  'Water',
  'WaterDipping',
  'Air',
  'Multi',
  'Glycerol',
  'Other',
] as const
export const OME_CORRECTIONS = [
  'UV',
  'PlanApo',
  'PlanFluor',
  'SuperFluor',
  'VioletCorrected',
  'Achro',
  'Achromat',
  'Fluor',
  'Fl',
  'Fluar',
  'Neofluar',
  'Fluotar',
  'Apo',
  'PlanNeofluar',
  'Other',
] as const
export const OME_LASER_TYPES = [
  'Excimer',
  'Gas',
  'MetalVapor',
  'SolidState',
  'Dye',
  'Semiconductor',
  'FreeElectron',
  'Other',
] as const
export const OME_LASER_PULSES = [
  'CW',
  'Single',
  'QSwitched',
  'Repetitive',
  'ModeLocked',
  'Other',
] as const
export const OME_DETECTOR_TYPES = [
  'CCD',
  'IntensifiedCCD',
  'AnalogVideo',
  'PMT',
  'Photodiode',
  'Spectroscopy',
  'LifetimeImaging',
  'CorrelationSpectroscopy',
  'FTIR',
  'EMCCD',
  'APD',
  'CMOS',
  'EBCCD',
  'Other',
] as const
export const OME_ILLUMINATION_TYPES = [
  'Transmitted',
  'Epifluorescence',
  'Oblique',
  'NonLinear',
  'Other',
] as const
export const OME_ACQUISITION_MODES = [
  'WideField',
  'LaserScanningConfocalMicroscopy',
  'SpinningDiskConfocal',
  'SlitScanConfocal',
  'MultiPhotonMicroscopy',
  'StructuredIllumination',
  'SingleMoleculeImaging',
  'TotalInternalReflection',
  'FluorescenceLifetime',
  'SpectralImaging',
  'FluorescenceCorrelationSpectroscopy',
  'NearFieldScanningOpticalMicroscopy',
  'SecondHarmonicGenerationImaging',
  'PALM',
  'STORM',
  'STED',
  'TIRF',
  'FSM',
  'LCM',
  'Other',
  'BrightField',
  'SweptFieldConfocal',
  'SPIM',
] as const
export const OME_BINNINGS = ['1x1', '2x2', '4x4', '8x8', 'Other'] as const

/** The light source kinds OME distinguishes (the child element of LightSource). */
export const OME_LIGHT_SOURCE_KINDS = [
  'Laser',
  'Arc',
  'Filament',
  'LightEmittingDiode',
  'GenericExcitationSource',
] as const

export type OmeImmersion = (typeof OME_IMMERSIONS)[number]
export type OmeDetectorType = (typeof OME_DETECTOR_TYPES)[number]
export type OmeAcquisitionMode = (typeof OME_ACQUISITION_MODES)[number]
export type OmeIlluminationType = (typeof OME_ILLUMINATION_TYPES)[number]
