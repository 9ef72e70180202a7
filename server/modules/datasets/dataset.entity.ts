import { defineEntity, p, type InferEntity } from '@mikro-orm/core'
import type { DatasetState } from '@shared/domain/dataset-state'
import { DEFAULT_LICENCE } from '@shared/domain/licences'
import type { ShareCapability } from '@shared/domain/roles'
import { Project } from '../projects/project.entity'
import { User } from '../users/user.entity'

export const Dataset = defineEntity({
  name: 'Dataset',
  // One index per sort (the sorted column, then id for ties) that also carries the columns the
  // visibility filter reads (state, project), so a page walks one index in order and touches the
  // table only for the rows it returns. (state, project) serves counts; (project, createdAt) the
  // project page. tests/api/datasets-query-plan.test.ts checks the plans the list uses.
  indexes: [
    { name: 'dataset_list_created_at_index', properties: ['createdAt', 'id', 'state', 'project'] },
    { name: 'dataset_list_updated_at_index', properties: ['updatedAt', 'id', 'state', 'project'] },
    { name: 'dataset_list_title_index', properties: ['title', 'id', 'state', 'project'] },
    { name: 'dataset_list_accession_index', properties: ['accession', 'id', 'state', 'project'] },
    { name: 'dataset_list_state_index', properties: ['state', 'id', 'project'] },
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
