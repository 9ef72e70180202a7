import type { SMLM_TECHNIQUES, ILLUMINATIONS } from '@shared/metadata/acquisition.schema'
import type { OmeAcquisitionMode, OmeIlluminationType } from '@shared/metadata/ome-terms'

type Technique = (typeof SMLM_TECHNIQUES)[number]
type Illumination = (typeof ILLUMINATIONS)[number]

/** Our namespace for the key-value annotation that carries fields OME has no element for. */
export const STIPPLE_MAP_NAMESPACE = 'urn:stipple:metadata:1'

/** OME's AcquisitionMode holds one value: the SMLM technique goes there (DNA-PAINT has none). */
export function acquisitionModeFor(
  technique: Technique | undefined,
  illumination: Illumination | undefined,
): OmeAcquisitionMode {
  if (technique === 'STORM' || technique === 'dSTORM') return 'STORM'
  if (technique === 'PALM') return 'PALM'
  if (technique) return 'SingleMoleculeImaging'
  return illumination === 'TIRF' ? 'TIRF' : 'SingleMoleculeImaging'
}

/** Excitation through the objective is epifluorescence in OME's terms; HILO is oblique (common practice). */
export function illuminationTypeFor(
  illumination: Illumination | undefined,
): OmeIlluminationType | undefined {
  switch (illumination) {
    case 'TIRF':
    case 'epifluorescence':
      return 'Epifluorescence'
    case 'HILO':
      return 'Oblique'
    case 'light sheet':
    case 'other':
      return 'Other'
    default:
      return undefined
  }
}

export function techniqueFromOme(mode: string | undefined): Technique | undefined {
  if (mode === 'STORM') return 'STORM'
  if (mode === 'PALM') return 'PALM'
  return undefined
}

export function illuminationFromOme(
  mode: string | undefined,
  type: string | undefined,
): Illumination | undefined {
  if (mode === 'TIRF' || mode === 'TotalInternalReflection') return 'TIRF'
  if (type === 'Oblique') return 'HILO'
  if (type === 'Epifluorescence') return 'epifluorescence'
  return undefined
}
