import { describe, expect, it } from 'vitest'
import { metadataSchema } from '@shared/metadata/metadata.schema'
import { toDataCite } from '@server/modules/metadata/exports/datacite'
import type { DatasetExportSubject } from '@server/modules/metadata/exports/export-subject'
import { toJsonLd } from '@server/modules/metadata/exports/json-ld'
import { methodsSummary } from '@server/modules/metadata/exports/methods-text'
import { completeMetadata } from '../../fixtures/metadata'

function subject(overrides: Partial<DatasetExportSubject> = {}): DatasetExportSubject {
  return {
    accession: 'STPL-000042',
    title: 'Nup96 dSTORM in fibroblasts',
    description: 'Eight-fold symmetric rings of the nuclear pore scaffold.',
    licence: 'CC-BY-4.0',
    version: 1,
    landingUrl: 'https://hub.example.org/datasets/STPL-000042',
    depositorName: 'Avery Tester',
    projectName: 'Pore census',
    submittedAt: new Date('2026-03-01T10:00:00Z'),
    approvedAt: new Date('2026-03-10T10:00:00Z'),
    embargoUntil: new Date('2027-01-01T00:00:00Z'),
    files: [
      {
        name: 'locs.csv',
        size: 1234,
        sha256: 'ab'.repeat(32),
        mediaType: 'text/csv',
        url: 'https://hub.example.org/f/1',
      },
    ],
    metadata: metadataSchema.parse(completeMetadata()),
    ...overrides,
  }
}

describe('DataCite', () => {
  it('has every mandatory property of the DataCite schema', () => {
    // Mandatory in DataCite 4.x: Identifier, Creator, Title, Publisher, PublicationYear, ResourceType (DOMAIN.md 3.5).
    const a = toDataCite(subject()).data.attributes
    expect(a.identifiers[0]).toMatchObject({
      identifier: 'https://hub.example.org/datasets/STPL-000042',
      identifierType: 'URL',
    })
    expect(a.creators[0]).toMatchObject({
      name: 'Avery Tester',
      nameIdentifiers: [
        { nameIdentifier: 'https://orcid.org/0000-0002-1825-0097', nameIdentifierScheme: 'ORCID' },
      ],
    })
    expect(a.titles).toEqual([{ title: 'Nup96 dSTORM in fibroblasts' }])
    expect(a.publisher.name).toBeTruthy()
    expect(a.types).toEqual({ resourceTypeGeneral: 'Dataset', resourceType: expect.any(String) })
    expect(a.rightsList[0]).toMatchObject({
      rightsIdentifier: 'CC-BY-4.0',
      rightsIdentifierScheme: 'SPDX',
    })
  })

  it('states an embargo as Submitted and Available dates; PublicationYear is the year it ends', () => {
    const a = toDataCite(subject()).data.attributes
    expect(a.dates).toEqual([
      { date: '2026-03-01', dateType: 'Submitted' },
      { date: '2027-01-01', dateType: 'Available' },
    ])
    expect(a.publicationYear).toBe(2027)
  })

  it('falls back to the project as organizational creator when no authors are given', () => {
    const a = toDataCite(subject({ metadata: {} })).data.attributes
    expect(a.creators).toEqual([{ name: 'Pore census', nameType: 'Organizational' }])
    expect(a.relatedIdentifiers).toEqual([])
  })
})

describe('schema.org JSON-LD', () => {
  it('describes a Dataset with the properties search engines require, hiding files under embargo', () => {
    const ld = toJsonLd(subject())
    expect(ld).toMatchObject({
      '@context': 'https://schema.org',
      '@type': 'Dataset',
      name: 'Nup96 dSTORM in fibroblasts',
      license: 'https://spdx.org/licenses/CC-BY-4.0.html',
    })
    expect(ld.description.length).toBeGreaterThanOrEqual(50)
    expect(ld.creator[0]).toMatchObject({
      '@type': 'Person',
      identifier: 'https://orcid.org/0000-0002-1825-0097',
    })
    expect(ld.distribution).toEqual([])
    const open = toJsonLd(subject({ embargoUntil: null }))
    expect(open.distribution).toEqual([
      expect.objectContaining({
        '@type': 'DataDownload',
        contentUrl: 'https://hub.example.org/f/1',
      }),
    ])
  })
})

describe('methods summary', () => {
  it('reads as a paragraph with the key facts and the diffraction limit', () => {
    const text = methodsSummary(subject())
    expect(text).toContain(
      'dSTORM was performed with TIRF illumination on an inverted microscope with a 100×/1.49 NA oil-immersion objective',
    )
    expect(text).toContain(
      'Nup96 was labelled with far-red cyanine dye (self-labelling enzyme tag; estimated linkage error 5 nm).',
    )
    expect(text).toContain('recorded on an EMCCD camera')
    expect(text).toContain('fitting an integrated Gaussian PSF model')
    expect(text).toContain('40,000 frames were acquired at 15 ms exposure')
    // Abbe λ/(2NA) for 670 nm and NA 1.49 = 224.8 nm (DOMAIN.md 1.2 check value).
    expect(text).toContain('is 224.83 nm')
    expect(text).toMatch(/STPL-000042 .* under the CC-BY-4.0 licence\.$/)
  })
})
