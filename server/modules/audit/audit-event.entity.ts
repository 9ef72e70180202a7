import { defineEntity, p, type InferEntity } from '@mikro-orm/core'
import { User } from '../users/user.entity'

/** One access-relevant event. Rows are only ever added. */
export const AuditEvent = defineEntity({
  name: 'AuditEvent',
  indexes: [{ properties: ['targetType', 'targetId'] }, { properties: ['time'] }],
  properties: {
    id: p.integer().primary(),
    actor: p.manyToOne(User).mapToPk().nullable(),
    action: p.string(),
    targetType: p.string(),
    targetId: p.string(),
    time: p.datetime().onCreate(() => new Date()),
    address: p.string().nullable(),
    details: p.json<Record<string, unknown>>().nullable(),
  },
})
export type IAuditEvent = InferEntity<typeof AuditEvent>
