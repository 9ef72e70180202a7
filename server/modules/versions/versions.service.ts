import type { EntityManager } from '@mikro-orm/better-sqlite'
import {
  versionLabel,
  type DatasetVersionDto,
  type VersionFileDto,
} from '@shared/schemas/dataset-version.schema'
import { ConflictError, NotFoundError } from '../../errors/http-error'
import type { LocalStorage } from '../../storage/local-storage'
import type { IDataset } from '../datasets/dataset.entity'
import { DatasetFile } from '../files/dataset-file.entity'
import { metadataOf } from '../metadata/metadata.service'
import { User } from '../users/user.entity'
import {
  DatasetVersion,
  VersionFile,
  type IDatasetVersion,
  type IVersionBlob,
} from './dataset-version.entity'
import { blobFor } from './version-blobs'

/**
 * Freezes the dataset as approved now into its next version: metadata snapshot and the list of
 * its ready files (name, size, SHA-256), their bytes kept as shared blobs. The DOI registration
 * is due at once (the registrar picks it up).
 */
export async function freezeVersion(
  em: EntityManager,
  storage: LocalStorage,
  dataset: IDataset,
  approvedBy: number | null,
  now: Date,
): Promise<IDatasetVersion> {
  const number = (await em.count(DatasetVersion, { dataset: dataset.id })) + 1
  const files = await em.find(
    DatasetFile,
    { dataset: dataset.id, status: 'ready', sha256: { $ne: null } },
    { orderBy: { name: 'asc', id: 'asc' } },
  )
  const version = em.create(DatasetVersion, {
    dataset: dataset.id,
    number,
    label: versionLabel(dataset.accession, number),
    title: dataset.title,
    description: dataset.description,
    licence: dataset.licence,
    metadata: structuredClone(await metadataOf(em, dataset.id)),
    approvedAt: now,
    approvedBy,
    doiStatus: 'pending',
    doiNextAttemptAt: now,
  })
  await em.flush()
  await freezeFiles(em, storage, version.id, files, now)
  dataset.version = number
  return version
}

/**
 * Adds deposited files to a version's frozen list, their bytes kept as shared blobs. Two deposits
 * may share a name; the list keeps the first (pass them ordered by id).
 */
export async function freezeFiles(
  em: EntityManager,
  storage: LocalStorage,
  versionId: number,
  files: { name: string; size: number; sha256?: string | null; storageKey: string }[],
  now: Date,
): Promise<void> {
  const unique = files.filter((f, i) => files.findIndex((g) => g.name === f.name) === i)
  const blobs: IVersionBlob[] = []
  for (const f of unique) {
    const stored = { sha256: f.sha256!, size: f.size, storageKey: f.storageKey }
    blobs.push(await blobFor(em, storage, stored, now))
  }
  await em.flush()
  unique.forEach((f, i) =>
    em.create(VersionFile, {
      version: versionId,
      blob: blobs[i]!.id,
      name: f.name,
      size: f.size,
      sha256: f.sha256!,
    }),
  )
}

/**
 * Opens the next version of an approved dataset as a draft: the dataset becomes editable again
 * while its approved versions stay frozen and readable through the versions API.
 */
export function startRevision(dataset: IDataset): number {
  if (dataset.state !== 'approved') {
    throw new ConflictError(
      `Only an approved dataset can get a new version; ${dataset.accession} is ${dataset.state.replace('_', ' ')}.`,
    )
  }
  dataset.state = 'draft'
  dataset.submittedAt = null
  dataset.version += 1
  return dataset.version
}

async function toVersionDtos(
  em: EntityManager,
  accession: string,
  versions: IDatasetVersion[],
): Promise<DatasetVersionDto[]> {
  if (!versions.length) return []
  const files = await em.find(
    VersionFile,
    { version: { $in: versions.map((v) => v.id) } },
    { orderBy: { name: 'asc' } },
  )
  const approverIds = [
    ...new Set(versions.map((v) => v.approvedBy).filter((id): id is number => id != null)),
  ]
  const approvers = approverIds.length
    ? await em.find(User, { id: { $in: approverIds } }, { fields: ['name'] })
    : []
  const approverName = new Map(approvers.map((u) => [u.id, u.name]))
  return versions.map((v) => {
    const own: VersionFileDto[] = files
      .filter((f) => f.version === v.id)
      .map((f) => ({ id: f.id, name: f.name, size: f.size, sha256: f.sha256 }))
    return {
      number: v.number,
      label: v.label,
      accession,
      title: v.title,
      description: v.description,
      licence: v.licence,
      metadata: v.metadata as Record<string, unknown>,
      files: own,
      fileCount: own.length,
      totalBytes: own.reduce((sum, f) => sum + f.size, 0),
      approvedAt: v.approvedAt.toISOString(),
      approvedByName: v.approvedBy != null ? (approverName.get(v.approvedBy) ?? null) : null,
      doi: v.doi ?? null,
      doiStatus: v.doiStatus,
      doiError: v.doiError ?? null,
      doiAttempts: v.doiAttempts,
    }
  })
}

/**
 * Every approved version of a dataset, newest first, with its frozen files. No access check:
 * callers decide who may read (and whether the files may be shown, see versionFilesOpen).
 */
export async function listVersions(
  em: EntityManager,
  datasetId: number,
): Promise<DatasetVersionDto[]> {
  const versions = await em.find(
    DatasetVersion,
    { dataset: datasetId },
    { orderBy: { number: 'desc' } },
  )
  const accession = versions[0]?.label.replace(/\.v\d+$/, '') ?? ''
  return toVersionDtos(em, accession, versions)
}

/** One version by number, or 404. */
export async function getVersion(
  em: EntityManager,
  dataset: Pick<IDataset, 'id' | 'accession'>,
  number: number,
): Promise<DatasetVersionDto> {
  const version = await em.findOne(DatasetVersion, { dataset: dataset.id, number })
  if (!version) throw new NotFoundError('version', `${dataset.accession}.v${number}`)
  return (await toVersionDtos(em, dataset.accession, [version]))[0]!
}

/** A dataset with approved versions is part of the record: it can be withdrawn, never deleted. */
export async function assertNoApprovedVersions(em: EntityManager, dataset: IDataset) {
  if (await em.count(DatasetVersion, { dataset: dataset.id })) {
    throw new ConflictError(
      `${dataset.accession} has approved versions and cannot be deleted; a steward can withdraw it.`,
    )
  }
}
