import { defineEntity, p, type InferEntity } from '@mikro-orm/core'
import { User } from '../users/user.entity'

const appendOnly = () => {
  throw new Error('Audit events are append-only: they are never changed or removed.')
}

/**
 * One access-relevant event. Rows are only ever added: the ORM refuses to update or delete one,
 * and database triggers abort any statement that tries (migration 20261204221757).
 */
export const AuditEvent = defineEntity({
  name: 'AuditEvent',
  hooks: { beforeUpdate: [appendOnly], beforeDelete: [appendOnly] },
  indexes: [{ properties: ['targetType', 'targetId'] }, { properties: ['time'] }],
  properties: {
    id: p.integer().primary(),
    actor: p.manyToOne(User).mapToPk().nullable(),
    action: p.string(),
    targetType: p.string(),
    targetId: p.string(),
    time: p.datetime().onCreate(() => new Date()),
    address: p.string().nullable(),
    // json, not jsonb, on PostgreSQL: the details keep the order they were written in (jsonb sorts
    // keys), which the audit log shows them in.
    details: p.json<Record<string, unknown>>().columnType('json').nullable(),
  },
})
export type IAuditEvent = InferEntity<typeof AuditEvent>
