import { defineEntity, p, type InferEntity } from '@mikro-orm/core'
import { User } from '../users/user.entity'

/** A personal access token. Only the SHA-256 of the secret is stored. */
export const ApiToken = defineEntity({
  name: 'ApiToken',
  properties: {
    id: p.integer().primary(),
    user: p.manyToOne(User).mapToPk().index(),
    name: p.string(),
    tokenHash: p.string().unique(),
    /** The first characters of the secret, so people can tell their tokens apart. */
    prefix: p.string(),
    createdAt: p.datetime().onCreate(() => new Date()),
    lastUsedAt: p.datetime().nullable(),
    expiresAt: p.datetime().nullable(),
    revokedAt: p.datetime().nullable(),
  },
})
export type IApiToken = InferEntity<typeof ApiToken>
