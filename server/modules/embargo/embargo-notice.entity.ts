import { defineEntity, p, type InferEntity } from '@mikro-orm/core'
import { Dataset } from '../datasets/dataset.entity'

/** What the scheduler does once per dataset and embargo end. */
export type EmbargoNoticeKind = 'reminder' | 'release'

/**
 * One reminder or release the scheduler carried out, keyed by the embargo end it was for. The
 * unique key makes every tick idempotent: a second tick (or a second process) finds the row and
 * does nothing; a changed embargo end is a new key, so it gets its own reminder and release.
 */
export const EmbargoNotice = defineEntity({
  name: 'EmbargoNotice',
  uniques: [{ properties: ['dataset', 'kind', 'embargoUntil'] }],
  properties: {
    id: p.integer().primary(),
    dataset: p.manyToOne(Dataset).mapToPk().deleteRule('cascade'),
    kind: p.string().$type<EmbargoNoticeKind>(),
    embargoUntil: p.datetime(),
    /** When the scheduler acted (its injected clock), which may be after the end after downtime. */
    doneAt: p.datetime(),
  },
})
export type IEmbargoNotice = InferEntity<typeof EmbargoNotice>
