import { defineEntity, p, type InferEntity } from '@mikro-orm/core'
import type { DatasetState } from '@shared/domain/dataset-state'
import { DEFAULT_LICENCE } from '@shared/domain/licences'
import type { ShareCapability } from '@shared/domain/roles'
import { Project } from '../projects/project.entity'
import { User } from '../users/user.entity'

export const Dataset = defineEntity({
  name: 'Dataset',
  // One index per sortable column lets a sorted page read only its rows; (state, project) covers
  // the visibility conditions, so counting what someone may see stays inside an index.
  indexes: [
    { properties: ['createdAt'] },
    { properties: ['updatedAt'] },
    { properties: ['title'] },
    { properties: ['project', 'createdAt'] },
    { properties: ['state', 'project'] },
  ],
  properties: {
    id: p.integer().primary(),
    accession: p.string().unique(),
    title: p.string(),
    description: p.text().default(''),
    project: p.manyToOne(Project).mapToPk(),
    state: p.string().$type<DatasetState>().default('draft'),
    /** Approved datasets become public at 00:00 UTC of this day; null means public on approval. */
    embargoUntil: p.datetime().nullable(),
    /** The depositor's wish, which the steward confirms or changes on approval. */
    proposedEmbargoUntil: p.datetime().nullable(),
    licence: p.string().default(DEFAULT_LICENCE),
    version: p.integer().default(1),
    createdBy: p.manyToOne(User).mapToPk().nullable(),
    createdAt: p.datetime().onCreate(() => new Date()),
    updatedAt: p
      .datetime()
      .onCreate(() => new Date())
      .onUpdate(() => new Date()),
    submittedAt: p.datetime().nullable(),
    approvedAt: p.datetime().nullable(),
  },
})
export type IDataset = InferEntity<typeof Dataset>

/** A dataset shared with one person, with the capabilities beyond reading that it grants. */
export const DatasetShare = defineEntity({
  name: 'DatasetShare',
  uniques: [{ properties: ['dataset', 'user'] }],
  properties: {
    id: p.integer().primary(),
    dataset: p.manyToOne(Dataset).mapToPk().deleteRule('cascade'),
    user: p.manyToOne(User).mapToPk().index(),
    capabilities: p.json<ShareCapability[]>(),
    createdBy: p.manyToOne(User).mapToPk().nullable(),
    createdAt: p.datetime().onCreate(() => new Date()),
  },
})
export type IDatasetShare = InferEntity<typeof DatasetShare>
