import { defineEntity, p, type InferEntity } from '@mikro-orm/core'
import type {
  CurationChecklist,
  CurationCheckDto,
  CurationStep,
} from '@shared/schemas/curation.schema'
import { Dataset } from '../datasets/dataset.entity'
import { User } from '../users/user.entity'

/**
 * One step of a dataset's curation thread: a submission, the steward's decision with the
 * checklist and comment, or the start of a new version. Kept as its own record (not in mail or
 * audit details) so depositors and stewards read the same history on the dataset page.
 */
export const CurationEntry = defineEntity({
  name: 'CurationEntry',
  indexes: [{ properties: ['dataset', 'id'] }],
  properties: {
    id: p.integer().primary(),
    dataset: p.manyToOne(Dataset).mapToPk().deleteRule('cascade'),
    step: p.string().$type<CurationStep>(),
    version: p.integer(),
    actor: p.manyToOne(User).mapToPk().nullable(),
    comment: p.text().default(''),
    checks: p.json<CurationCheckDto[]>(),
    checklist: p.json<CurationChecklist>(),
    createdAt: p.datetime(),
  },
})
export type ICurationEntry = InferEntity<typeof CurationEntry>
