import { orcidUrl } from '@shared/domain/identifiers'
import { availableFrom, day, doiUrl, type DatasetExportSubject, spdxUrl } from './export-subject'

/** Google's dataset guidance asks for a description of 50 to 5000 characters. */
const DESCRIPTION_MIN = 50
const DESCRIPTION_MAX = 5000

function describe(s: DatasetExportSubject): string {
  const text = (s.description || s.title).trim()
  const long =
    text.length >= DESCRIPTION_MIN
      ? text
      : `${text}. Single-molecule localization microscopy data, Stipple accession ${s.accession}.`
  return long.slice(0, DESCRIPTION_MAX)
}

/**
 * schema.org Dataset as JSON-LD, for the public landing page and for harvesters, with the
 * properties Google's dataset guidance requires (name, description) and recommends.
 */
export function toJsonLd(s: DatasetExportSubject, now: Date = new Date()) {
  const m = s.metadata
  const available = availableFrom(s)
  const open = available !== null && available.getTime() <= now.getTime()
  const funders = (m.study?.funding ?? []).filter((f) => f.funder)
  return {
    '@context': 'https://schema.org',
    '@type': 'Dataset',
    '@id': s.landingUrl,
    name: s.title,
    description: describe(s),
    identifier: [s.accession, s.landingUrl],
    url: s.landingUrl,
    version: String(s.version),
    license: spdxUrl(s.licence),
    isAccessibleForFree: true,
    ...(available ? { datePublished: day(available) } : {}),
    keywords: m.study?.keywords ?? [],
    creator: (m.study?.authors ?? [])
      .filter((a) => a.name)
      .map((a) => ({
        '@type': 'Person',
        name: a.name,
        ...(a.orcid ? { identifier: orcidUrl(a.orcid), sameAs: orcidUrl(a.orcid) } : {}),
        ...(a.affiliation ? { affiliation: { '@type': 'Organization', name: a.affiliation } } : {}),
      })),
    measurementTechnique: [
      m.acquisition?.technique,
      m.acquisition?.illumination && `${m.acquisition.illumination} illumination`,
      'single-molecule localization microscopy',
    ].filter(Boolean),
    variableMeasured: ['localization x (nm)', 'localization y (nm)', 'frame'],
    ...(m.study?.relatedPublicationDoi ? { citation: doiUrl(m.study.relatedPublicationDoi) } : {}),
    ...(funders.length
      ? { funder: funders.map((f) => ({ '@type': 'Organization', name: f.funder })) }
      : {}),
    includedInDataCatalog: { '@type': 'DataCatalog', name: 'Stipple' },
    // Files are listed only once they may be downloaded (no embargo left).
    distribution: open
      ? s.files.map((f) => ({
          '@type': 'DataDownload',
          name: f.name,
          contentUrl: f.url,
          contentSize: `${f.size} B`,
          ...(f.mediaType ? { encodingFormat: f.mediaType } : {}),
        }))
      : [],
  }
}
