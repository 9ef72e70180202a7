import { defineEntity, p, type InferEntity } from '@mikro-orm/core'

/** Named counters (accession numbers). Values only ever grow, so a number is never handed out twice. */
export const Sequence = defineEntity({
  name: 'Sequence',
  properties: {
    name: p.string().primary(),
    value: p.integer().default(0),
  },
})
export type ISequence = InferEntity<typeof Sequence>
