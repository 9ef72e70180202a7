import { defineEntity, p, type InferEntity } from '@mikro-orm/core'
import { Dataset } from '../datasets/dataset.entity'
import { Region } from '../regions/region.entity'
import { User } from '../users/user.entity'

/**
 * A comment in a thread on a dataset or on one of its regions. A comment without `replyTo` opens
 * the thread and carries its resolved state. The Markdown is rendered and sanitised once, on write.
 */
export const Comment = defineEntity({
  name: 'Comment',
  indexes: [{ properties: ['dataset', 'createdAt'] }, { properties: ['region', 'createdAt'] }],
  properties: {
    id: p.integer().primary(),
    dataset: p.manyToOne(Dataset).mapToPk().deleteRule('cascade'),
    region: p.manyToOne(Region).mapToPk().nullable().deleteRule('cascade'),
    author: p.manyToOne(User).mapToPk(),
    body: p.text(),
    bodyHtml: p.text().default(''),
    replyTo: p.integer().nullable(),
    createdAt: p.datetime().onCreate(() => new Date()),
    editedAt: p.datetime().nullable(),
    resolvedAt: p.datetime().nullable(),
    resolvedBy: p.manyToOne(User).mapToPk().nullable(),
  },
})
export type IComment = InferEntity<typeof Comment>

/** A person with access who was mentioned in a comment (others are never recorded). */
export const CommentMention = defineEntity({
  name: 'CommentMention',
  uniques: [{ properties: ['comment', 'user'] }],
  indexes: [{ properties: ['user', 'comment'] }],
  properties: {
    id: p.integer().primary(),
    comment: p.manyToOne(Comment).mapToPk().deleteRule('cascade'),
    user: p.manyToOne(User).mapToPk().deleteRule('cascade'),
  },
})
