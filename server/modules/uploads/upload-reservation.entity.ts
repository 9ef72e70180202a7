import { defineEntity, p, type InferEntity } from '@mikro-orm/core'
import { Dataset } from '../datasets/dataset.entity'
import { Project } from '../projects/project.entity'
import { User } from '../users/user.entity'

/**
 * An upload in progress: the space it will take counts against the project's quota, and it can be
 * listed and resumed. Removed when the upload is registered, cancelled or expires.
 */
export const UploadReservation = defineEntity({
  name: 'UploadReservation',
  properties: {
    uploadId: p.string().primary(),
    project: p.manyToOne(Project).mapToPk().index(),
    dataset: p.manyToOne(Dataset).mapToPk().deleteRule('cascade').index(),
    user: p.manyToOne(User).mapToPk(),
    fileName: p.string(),
    size: p.bigint('number'),
    createdAt: p.datetime().onCreate(() => new Date()),
  },
})
export type IUploadReservation = InferEntity<typeof UploadReservation>
