import { defineEntity, p, type InferEntity } from '@mikro-orm/core'
import type { RegionGeometry, RegionShape } from '@shared/schemas/region.schema'
import { Dataset } from '../datasets/dataset.entity'
import { DatasetFile } from '../files/dataset-file.entity'
import { User } from '../users/user.entity'

/** A region of interest on one localization table, in the table's sample nm (never pixels). */
export const Region = defineEntity({
  name: 'Region',
  indexes: [{ properties: ['file', 'createdAt'] }, { properties: ['dataset', 'createdAt'] }],
  properties: {
    id: p.integer().primary(),
    /** The file's dataset, kept beside the file so access checks and lists need no join. */
    dataset: p.manyToOne(Dataset).mapToPk().deleteRule('cascade'),
    file: p.manyToOne(DatasetFile).mapToPk().deleteRule('cascade'),
    author: p.manyToOne(User).mapToPk(),
    label: p.string(),
    colour: p.string(),
    shape: p.string().$type<RegionShape>(),
    geometry: p.json<RegionGeometry>(),
    createdAt: p.datetime(),
    updatedAt: p.datetime(),
  },
})
export type IRegion = InferEntity<typeof Region>
