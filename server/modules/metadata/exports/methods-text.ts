import { abbeLimitNm } from '@shared/domain/optics'
import type { DatasetExportSubject } from './export-subject'

const n = (v: number) => v.toLocaleString('en-GB', { maximumFractionDigits: 2 })
const join = (parts: (string | number | false | undefined | null)[], sep = ', ') =>
  parts.filter((p) => typeof p === 'string' && p.length > 0).join(sep)
/** Capitalised, unless the first word is a term with capitals inside it (dSTORM, sCMOS). */
const sentence = (s: string) =>
  !s ? '' : /^\S*[a-z][A-Z]/.test(s) ? `${s}.` : `${s.charAt(0).toUpperCase()}${s.slice(1)}.`
const article = (word: string) => (/^[aeiouAEIOU]|^(EM|sCMOS|FM|LED)/.test(word) ? 'an' : 'a')

/** A plain-text methods paragraph a depositor can paste into a manuscript and edit. */
export function methodsSummary(s: DatasetExportSubject): string {
  const m = s.metadata
  const b = m.biosample
  const i = m.instrument
  const a = m.acquisition
  const p = m.processing
  const out: string[] = []

  const sample = join([b?.organism?.name, b?.cellType, b?.cellLine])
  if (sample || b?.structure)
    out.push(
      sentence(join([b?.structure && `${b.structure} was imaged`, sample && `in ${sample}`], ' ')),
    )
  if (b?.fixation) out.push(sentence(`samples were fixed with ${b.fixation}`))
  for (const l of m.labelling ?? []) {
    if (!l.target) continue
    const notes = join(
      [
        l.strategy,
        l.linkageErrorNm !== undefined && `estimated linkage error ${n(l.linkageErrorNm)} nm`,
      ],
      '; ',
    )
    out.push(
      sentence(
        join(
          [`${l.target} was labelled`, l.label && `with ${l.label}`, notes && `(${notes})`],
          ' ',
        ),
      ),
    )
  }
  const objective = i?.objective
  const lens = objective
    ? join(
        [
          objective.nominalMagnification && `${n(objective.nominalMagnification)}×`,
          objective.lensNA && `${n(objective.lensNA)} NA`,
        ],
        '/',
      )
    : ''
  const scope = join(
    [
      a?.technique ? `${a.technique} was performed` : 'Imaging was performed',
      a?.illumination && `with ${a.illumination} illumination`,
      i?.microscopeType &&
        `on ${article(i.microscopeType)} ${i.microscopeType.toLowerCase()} microscope`,
      lens &&
        `with a ${lens}${objective?.immersion ? ` ${objective.immersion.toLowerCase()}-immersion` : ''} objective`,
    ],
    ' ',
  )
  if (a?.technique || a?.illumination || i?.microscopeType || lens) out.push(sentence(scope))
  const lights = (i?.lightSources ?? [])
    .filter((l) => l.wavelengthNm)
    .map((l) =>
      join(
        [
          `${n(l.wavelengthNm!)} nm`,
          l.powerMw !== undefined && `${n(l.powerMw)} mW`,
          l.irradianceWPerCm2 !== undefined && `${n(l.irradianceWPerCm2 / 1000)} kW/cm²`,
          l.role,
        ],
        ' ',
      ),
    )
  if (lights.length) out.push(sentence(`light sources: ${lights.join('; ')}`))
  const d = i?.detector
  if (d?.type)
    out.push(
      sentence(
        join(
          [
            `emission was recorded on ${article(d.type)} ${d.type} camera`,
            d.pixelSizeNm &&
              `(pixel size ${n(d.pixelSizeNm)} nm at the sample${d.emGain ? `, EM gain ${n(d.emGain)}` : ''})`,
          ],
          ' ',
        ),
      ),
    )
  if (a?.frames || a?.exposureTimeMs)
    out.push(
      sentence(
        join(
          [
            a.frames && `${n(a.frames)} frames were acquired`,
            a.exposureTimeMs && `at ${n(a.exposureTimeMs)} ms exposure`,
            a.imagingBuffer && `in ${a.imagingBuffer}`,
            a.temperatureC !== undefined && `at ${n(a.temperatureC)} °C`,
          ],
          ' ',
        ),
      ),
    )
  if (p?.software) {
    out.push(
      sentence(
        join(
          [
            `localizations were obtained with ${p.software}${p.softwareVersion ? ` ${p.softwareVersion}` : ''}`,
            p.fittingModel && `fitting ${article(p.fittingModel)} ${p.fittingModel} PSF model`,
            p.estimator && `by ${p.estimator}`,
          ],
          ', ',
        ),
      ),
    )
  }
  if (p?.driftCorrection && p.driftCorrection !== 'none')
    out.push(sentence(`drift was corrected by ${p.driftCorrection}`))
  if (p?.mergingRadiusNm !== undefined) {
    out.push(
      sentence(
        `localizations within ${n(p.mergingRadiusNm)} nm${p.mergingMaxDarkFrames !== undefined ? ` and up to ${n(p.mergingMaxDarkFrames)} dark frames apart` : ''} were merged`,
      ),
    )
  }
  if (a?.emissionWavelengthNm && objective?.lensNA) {
    out.push(
      sentence(
        `the diffraction limit (Abbe, λ/2NA) for ${n(a.emissionWavelengthNm)} nm emission at NA ${n(objective.lensNA)} is ${n(abbeLimitNm(a.emissionWavelengthNm, objective.lensNA))} nm`,
      ),
    )
  }
  out.push(
    `The data are available from Stipple as ${s.accession} (${s.landingUrl}) under the ${s.licence} licence.`,
  )
  return out.join(' ')
}
