import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { AppConfig } from '../../config'
import { Dataset } from '../datasets/dataset.entity'
import { toDataCite } from '../metadata/exports/datacite'
import { exportSubject } from '../metadata/metadata.service'
import { VersionFile, type IDatasetVersion } from '../versions/dataset-version.entity'

/** The DOI of a version: the repository prefix and the version's label, in lower case. */
export const doiOf = (prefix: string, label: string) => `${prefix}/${label.toLowerCase()}`

/** Where a version's DOI resolves: its public landing page. */
export const versionLandingUrl = (publicUrl: string, accession: string, n: number) =>
  `${publicUrl}/d/${accession}/v/${n}`

/**
 * The DataCite REST body for one frozen version: the existing DataCite export, fed with the
 * version's frozen description and files instead of the working draft, with the DOI set and the
 * `publish` event, which makes the DOI findable.
 */
export async function doiPayload(
  em: EntityManager,
  version: IDatasetVersion,
  config: Pick<AppConfig, 'publicUrl' | 'datacite'>,
) {
  const dataset = await em.findOneOrFail(Dataset, { id: version.dataset })
  const files = await em.find(VersionFile, { version: version.id }, { orderBy: { name: 'asc' } })
  const current = await exportSubject(em, dataset, config.publicUrl)
  const doi = doiOf(config.datacite.prefix, version.label)
  const body = toDataCite({
    ...current,
    title: version.title,
    description: version.description,
    licence: version.licence,
    version: version.number,
    metadata: version.metadata,
    approvedAt: version.approvedAt,
    landingUrl: versionLandingUrl(config.publicUrl, dataset.accession, version.number),
    files: files.map((f) => ({
      name: f.name,
      size: f.size,
      sha256: f.sha256,
      mediaType: null,
      url: versionLandingUrl(config.publicUrl, dataset.accession, version.number),
    })),
  })
  return {
    data: {
      ...body.data,
      attributes: {
        ...body.data.attributes,
        doi,
        event: 'publish',
        identifiers: [{ identifier: doi, identifierType: 'DOI' }],
      },
    },
  }
}
