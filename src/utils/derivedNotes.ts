import { pixelAtSample } from '@shared/domain/optics'
import { diffractionLimits, formatNm, positive } from './derivedOptics'
import { getAt, type Draft } from './metadataPaths'

const NA = 'instrument.objective.lensNA'
const EMISSION = 'acquisition.emissionWavelengthNm'
const MAGNIFICATION = 'instrument.objective.nominalMagnification'
const TUBE_LENS = 'instrument.objective.tubeLensMagnification'
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
  const objective = positive(getAt(doc, MAGNIFICATION))
  const tube = positive(getAt(doc, TUBE_LENS))
  // The same total magnification (objective × tube lens) as the expected-precision panel uses.
  const atSample = pixelAtSample({ chipPixelUm: chip, objective, tubeLens: tube })
  if (atSample) {
    const magnification =
      tube === null ? `${objective}×` : `(${objective}× objective × ${tube}× tube lens)`
    notes[PIXEL] = [`${chip} µm ÷ ${magnification} = ${formatNm(atSample.pixelNm)} at the sample`]
  }
  return notes
}
