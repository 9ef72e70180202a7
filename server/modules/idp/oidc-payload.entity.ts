import { defineEntity, p, type InferEntity } from '@mikro-orm/core'

/**
 * What the stand-in identity provider keeps between requests (its sessions, interactions, grants,
 * codes, tokens), one row per model and id, so a restart does not lose a sign-in in progress.
 */
export const OidcPayload = defineEntity({
  name: 'OidcPayload',
  properties: {
    model: p.string().primary(),
    id: p.string().primary(),
    payload: p.json<Record<string, unknown>>(),
    grantId: p.string().nullable().index(),
    uid: p.string().nullable().index(),
    userCode: p.string().nullable().index(),
    expiresAt: p.datetime().nullable().index(),
  },
})
export type IOidcPayload = InferEntity<typeof OidcPayload>
