import { pixelSizeAtSampleNm } from '@shared/domain/optics'
import { diffractionLimits, formatNm, positive } from './derivedOptics'
import { getAt, type Draft } from './metadataPaths'

const NA = 'instrument.objective.lensNA'
const EMISSION = 'acquisition.emissionWavelengthNm'
const MAGNIFICATION = 'instrument.objective.nominalMagnification'
const CHIP_PIXEL = 'instrument.detector.physicalPixelSizeUm'
const PIXEL = 'instrument.detector.pixelSizeNm'

/** Values that follow from what was typed, shown beneath the fields they come from. */
export function derivedNotes(doc: Draft): Record<string, string[]> {
  const notes: Record<string, string[]> = {}
  const limits = diffractionLimits(getAt(doc, EMISSION), getAt(doc, NA))
  if (limits) {
    const lines = [
      `Abbe limit λ/(2·NA) = ${formatNm(limits.abbeNm)}`,
      `Rayleigh limit 0.61·λ/NA = ${formatNm(limits.rayleighNm)}`,
    ]
    notes[NA] = lines
    notes[EMISSION] = lines
  } else if (positive(getAt(doc, NA)) !== null) {
    notes[NA] = ['The diffraction limits show here once the emission wavelength is given']
  } else if (positive(getAt(doc, EMISSION)) !== null) {
    notes[EMISSION] = ['The diffraction limits show here once the objective NA is given']
  }
  const chip = positive(getAt(doc, CHIP_PIXEL))
  const magnification = positive(getAt(doc, MAGNIFICATION))
  if (chip !== null && magnification !== null) {
    const atSample = pixelSizeAtSampleNm(chip, magnification)
    notes[PIXEL] = [`${chip} µm ÷ ${magnification}× = ${formatNm(atSample)} at the sample`]
  }
  return notes
}
