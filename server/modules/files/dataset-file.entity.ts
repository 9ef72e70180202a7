import { defineEntity, p, type InferEntity } from '@mikro-orm/core'
import type { FileKind, FileStatus } from '@shared/domain/files'
import { Dataset } from '../datasets/dataset.entity'
import { User } from '../users/user.entity'

/** A file deposited in a dataset. The bytes live in storage under `storageKey`, never renamed. */
export const DatasetFile = defineEntity({
  name: 'DatasetFile',
  indexes: [{ properties: ['dataset', 'name'] }, { properties: ['dataset', 'sha256'] }],
  properties: {
    id: p.integer().primary(),
    dataset: p.manyToOne(Dataset).mapToPk().deleteRule('cascade'),
    /** The sanitised file name shown to people and used in manifests. */
    name: p.string(),
    size: p.bigint('number'),
    /** Bytes computed from it (localization store, thumbnails, tiles); they count against the quota. */
    derivedBytes: p.bigint('number').default(0),
    sha256: p.string().nullable(),
    kind: p.string().$type<FileKind>().default('other'),
    status: p.string().$type<FileStatus>().default('processing'),
    storageKey: p.string().unique(),
    mediaType: p.string().nullable(),
    /** Why the file cannot be used, in words (status 'rejected'), or what it waits for. */
    problem: p.text().nullable(),
    /** The confirmed column mapping of a localization table. */
    mapping: p.json<Record<string, unknown>>().nullable(),
    /** What validation or scanning found: row counts by reason, dimensions, statistics. */
    report: p.json<Record<string, unknown>>().nullable(),
    createdBy: p.manyToOne(User).mapToPk().nullable(),
    createdAt: p.datetime().onCreate(() => new Date()),
  },
})
export type IDatasetFile = InferEntity<typeof DatasetFile>
