import { defineEntity, p, type InferEntity } from '@mikro-orm/core'

/** A lab or institute of the consortium. People whose e-mail domain matches join it at sign-in. */
export const Organization = defineEntity({
  name: 'Organization',
  properties: {
    id: p.integer().primary(),
    name: p.string().unique(),
    kind: p.string().$type<'lab' | 'institute'>().default('lab'),
    emailDomain: p.string().nullable().unique(),
    createdAt: p.datetime().onCreate(() => new Date()),
  },
})
export type IOrganization = InferEntity<typeof Organization>
