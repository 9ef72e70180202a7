import { defineEntity, p, type InferEntity } from '@mikro-orm/core'
import { Dataset } from '../datasets/dataset.entity'
import { User } from '../users/user.entity'

/**
 * A time-limited, revocable link that lets anyone holding it view, preview and download one
 * dataset. Only the SHA-256 of its token is kept; the token itself is shown once, at creation.
 */
export const ReviewerLink = defineEntity({
  name: 'ReviewerLink',
  properties: {
    id: p.integer().primary(),
    dataset: p.manyToOne(Dataset).mapToPk().index().deleteRule('cascade'),
    /** The dataset version the link was made for (versions arrive with curation; 1 until then). */
    version: p.integer().default(1),
    tokenHash: p.string().unique(),
    anonymous: p.boolean().default(false),
    expiresAt: p.datetime(),
    revokedAt: p.datetime().nullable(),
    createdBy: p.manyToOne(User).mapToPk().nullable(),
    createdAt: p.datetime().onCreate(() => new Date()),
    /** Set only for links the demo seeder made: their token is derived from the server secret. */
    demo: p.boolean().default(false),
  },
})
export type IReviewerLink = InferEntity<typeof ReviewerLink>
