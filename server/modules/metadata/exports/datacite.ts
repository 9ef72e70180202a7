import { orcidUrl } from '@shared/domain/identifiers'
import { availableFrom, day, type DatasetExportSubject, spdxUrl } from './export-subject'
import { methodsSummary } from './methods-text'

/**
 * DataCite metadata (schema 4.x, in the JSON shape of the DataCite REST API) with every mandatory
 * property: Identifier, Creator, Title, Publisher, PublicationYear, ResourceType. Until a DOI is
 * registered the identifier is the landing page URL; the accession is an alternate identifier.
 * An embargo is stated as Submitted (start) and Available (end) dates, and PublicationYear is the
 * year the data becomes available.
 */
export function toDataCite(s: DatasetExportSubject) {
  const m = s.metadata
  const authors = m.study?.authors?.filter((a) => a.name) ?? []
  const creators = authors.length
    ? authors.map((a) => ({
        name: a.name!,
        nameType: 'Personal',
        ...(a.affiliation ? { affiliation: [{ name: a.affiliation }] } : {}),
        ...(a.orcid
          ? {
              nameIdentifiers: [
                {
                  nameIdentifier: orcidUrl(a.orcid),
                  nameIdentifierScheme: 'ORCID',
                  schemeUri: 'https://orcid.org',
                },
              ],
            }
          : {}),
      }))
    : [{ name: s.projectName, nameType: 'Organizational' }]
  const available = availableFrom(s)
  const dates = [
    ...(s.submittedAt ? [{ date: day(s.submittedAt), dateType: 'Submitted' }] : []),
    ...(available ? [{ date: day(available), dateType: 'Available' }] : []),
  ]
  const subjects = [
    ...(m.study?.keywords ?? []),
    m.acquisition?.technique,
    m.biosample?.structure,
  ].filter((x): x is string => Boolean(x))
  return {
    data: {
      type: 'dois',
      attributes: {
        doi: null,
        identifiers: [{ identifier: s.landingUrl, identifierType: 'URL' }],
        alternateIdentifiers: [
          { alternateIdentifier: s.accession, alternateIdentifierType: 'Accession' },
        ],
        url: s.landingUrl,
        creators,
        titles: [{ title: s.title }],
        publisher: { name: 'Stipple' },
        publicationYear: (available ?? new Date()).getUTCFullYear(),
        types: {
          resourceTypeGeneral: 'Dataset',
          resourceType: 'Single-molecule localization microscopy data',
        },
        subjects: subjects.map((subject) => ({ subject })),
        dates,
        language: 'en',
        version: String(s.version),
        rightsList: [
          {
            rights: s.licence,
            rightsUri: spdxUrl(s.licence),
            rightsIdentifier: s.licence,
            rightsIdentifierScheme: 'SPDX',
            schemeUri: 'https://spdx.org/licenses/',
          },
        ],
        descriptions: [
          ...(s.description ? [{ description: s.description, descriptionType: 'Abstract' }] : []),
          { description: methodsSummary(s), descriptionType: 'Methods' },
        ],
        fundingReferences: (m.study?.funding ?? [])
          .filter((f) => f.funder)
          .map((f) => ({
            funderName: f.funder!,
            ...(f.grantId ? { awardNumber: f.grantId } : {}),
          })),
        relatedIdentifiers: m.study?.relatedPublicationDoi
          ? [
              {
                relatedIdentifier: m.study.relatedPublicationDoi,
                relatedIdentifierType: 'DOI',
                relationType: 'IsSupplementTo',
              },
            ]
          : [],
        sizes: s.files.map((f) => `${f.size} bytes`),
        formats: [
          ...new Set(s.files.map((f) => f.mediaType).filter((x): x is string => Boolean(x))),
        ],
      },
    },
  }
}
