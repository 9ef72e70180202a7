import { defineEntity, p, type InferEntity } from '@mikro-orm/core'
import type { DatasetMetadata } from '@shared/metadata/metadata.schema'
import type { DoiStatus } from '@shared/schemas/dataset-version.schema'
import { Dataset } from '../datasets/dataset.entity'
import { User } from '../users/user.entity'

/**
 * A citable version, frozen at approval: nothing here changes afterwards except the DOI
 * registration's progress. The dataset itself goes on as the working draft of the next version.
 */
export const DatasetVersion = defineEntity({
  name: 'DatasetVersion',
  uniques: [{ properties: ['dataset', 'number'] }],
  indexes: [{ properties: ['doiStatus', 'doiNextAttemptAt'] }],
  properties: {
    id: p.integer().primary(),
    dataset: p.manyToOne(Dataset).mapToPk().deleteRule('cascade'),
    number: p.integer(),
    label: p.string().unique(),
    title: p.string(),
    description: p.text().default(''),
    licence: p.string(),
    metadata: p.json<DatasetMetadata>(),
    approvedAt: p.datetime(),
    approvedBy: p.manyToOne(User).mapToPk().nullable(),
    doi: p.string().nullable(),
    doiStatus: p.string().$type<DoiStatus>().default('pending'),
    doiAttempts: p.integer().default(0),
    /** When the registrar tries again (backoff); null once registered or given up. */
    doiNextAttemptAt: p.datetime().nullable(),
    doiError: p.text().nullable(),
    doiFailedAt: p.datetime().nullable(),
  },
})
export type IDatasetVersion = InferEntity<typeof DatasetVersion>

/**
 * Stored bytes of frozen files, one per checksum: versions that hold the same file share its
 * blob instead of copying it. The blob is a hard link of the deposited original, so a later
 * edit of the draft (deleting or replacing the file) leaves the frozen bytes where they are.
 */
export const VersionBlob = defineEntity({
  name: 'VersionBlob',
  properties: {
    id: p.integer().primary(),
    sha256: p.string().unique(),
    size: p.bigint('number'),
    createdAt: p.datetime(),
  },
})
export type IVersionBlob = InferEntity<typeof VersionBlob>

/** A file as frozen in one version: its name there, and the shared blob holding its bytes. */
export const VersionFile = defineEntity({
  name: 'VersionFile',
  uniques: [{ properties: ['version', 'name'] }],
  properties: {
    id: p.integer().primary(),
    version: p.manyToOne(DatasetVersion).mapToPk().deleteRule('cascade'),
    blob: p.manyToOne(VersionBlob).mapToPk(),
    name: p.string(),
    size: p.bigint('number'),
    sha256: p.string(),
  },
})
export type IVersionFile = InferEntity<typeof VersionFile>
