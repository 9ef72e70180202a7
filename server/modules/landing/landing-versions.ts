import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { DatasetMetadata } from '@shared/metadata/metadata.schema'
import type { IDataset } from '../datasets/dataset.entity'
import { listVersions } from '../versions/versions.service'

/** One frozen, citable version of a dataset, as the landing page shows it. */
export interface LandingVersion {
  number: number
  approvedAt: Date | null
  doi: string | null
  /** The version's frozen description and files; null: the dataset as it stands (see below). */
  frozen: {
    title: string
    description: string
    licence: string
    metadata: DatasetMetadata
    files: { id: number; name: string; size: number; sha256: string }[]
  } | null
}

/**
 * The citable versions of a dataset, newest first, from the records approval freezes
 * (server/modules/versions). A dataset approved before those records existed (older databases,
 * seeded states) counts as its own version 1, read as it stands.
 */
export async function versionsOf(em: EntityManager, dataset: IDataset): Promise<LandingVersion[]> {
  const frozen = await listVersions(em, dataset.id)
  if (frozen.length) {
    return frozen.map((v) => ({
      number: v.number,
      approvedAt: new Date(v.approvedAt),
      doi: v.doiStatus === 'registered' ? v.doi : null,
      frozen: {
        title: v.title,
        description: v.description,
        licence: v.licence,
        metadata: v.metadata as DatasetMetadata,
        files: v.files ?? [],
      },
    }))
  }
  if (dataset.state !== 'approved' && dataset.state !== 'withdrawn') return []
  return [{ number: 1, approvedAt: dataset.approvedAt ?? null, doi: null, frozen: null }]
}
