import { defineEntity, p, type InferEntity } from '@mikro-orm/core'
import type { Region } from '@shared/schemas/comment.schema'
import { Dataset } from '../datasets/dataset.entity'
import { User } from '../users/user.entity'

/** A comment on a dataset, optionally on a region of interest (in sample nanometres), optionally a reply. */
export const Comment = defineEntity({
  name: 'Comment',
  indexes: [{ properties: ['dataset', 'createdAt'] }],
  properties: {
    id: p.integer().primary(),
    dataset: p.manyToOne(Dataset).mapToPk().deleteRule('cascade'),
    author: p.manyToOne(User).mapToPk(),
    body: p.text(),
    region: p.json<Region>().nullable(),
    replyTo: p.integer().nullable(),
    createdAt: p.datetime().onCreate(() => new Date()),
  },
})
export type IComment = InferEntity<typeof Comment>
