import { defineEntity, p, type InferEntity } from '@mikro-orm/core'
import type { DatasetMetadata as MetadataDocument } from '@shared/metadata/metadata.schema'
import { Dataset } from '../datasets/dataset.entity'
import { Organization } from '../organizations/organization.entity'
import { User } from '../users/user.entity'
import type { InstrumentMetadata } from '@shared/metadata/instrument.schema'

/** A dataset's description on the metadata schema (shared/metadata), one document per dataset. */
export const DatasetMetadata = defineEntity({
  name: 'DatasetMetadata',
  properties: {
    dataset: p.manyToOne(Dataset).mapToPk().primary().deleteRule('cascade'),
    document: p.json<MetadataDocument>(),
    updatedBy: p.manyToOne(User).mapToPk().nullable(),
    /** Set by each save from the caller's clock: it tells whether an editing session goes on. */
    updatedAt: p.datetime().onCreate(() => new Date()),
  },
})
export type IDatasetMetadata = InferEntity<typeof DatasetMetadata>

/** An instrument description a lab saved once to reuse across its datasets. */
export const InstrumentProfile = defineEntity({
  name: 'InstrumentProfile',
  uniques: [{ properties: ['organization', 'name'] }],
  properties: {
    id: p.integer().primary(),
    organization: p.manyToOne(Organization).mapToPk().nullable(),
    name: p.string(),
    instrument: p.json<InstrumentMetadata>(),
    createdBy: p.manyToOne(User).mapToPk().nullable(),
    createdAt: p.datetime().onCreate(() => new Date()),
  },
})
export type IInstrumentProfile = InferEntity<typeof InstrumentProfile>
