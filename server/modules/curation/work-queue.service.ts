import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { AppAbility } from '@shared/permissions/abilities'
import type { WorkQueueDto, WorkQueueItemDto, WorkQueueKind } from '@shared/schemas/curation.schema'
import { ForbiddenError } from '../../errors/http-error'
import { accessibleWhere } from '../../http/access'
import { Dataset, type IDataset } from '../datasets/dataset.entity'
import { DatasetVersion } from '../versions/dataset-version.entity'

/** How far ahead the queue looks for embargoes that end. */
export const EMBARGO_WINDOW_DAYS = 30
const LIMIT = 50

const item = (
  kind: WorkQueueKind,
  d: Pick<IDataset, 'id' | 'accession' | 'title'>,
  at: Date | null | undefined,
  extra: { version?: number; detail?: string | null } = {},
): WorkQueueItemDto => ({
  kind,
  datasetId: d.id,
  accession: d.accession,
  title: d.title,
  at: at ? at.toISOString() : null,
  version: extra.version ?? null,
  detail: extra.detail ?? null,
})

/**
 * What waits for a steward: submissions to review (oldest first), datasets sent back for
 * changes, embargoes ending within EMBARGO_WINDOW_DAYS, and DOI registrations that failed. Only
 * datasets the steward's abilities cover are listed; people who curate nothing get 403.
 */
export async function stewardWorkQueue(
  em: EntityManager,
  ability: AppAbility,
  now: Date,
): Promise<WorkQueueDto> {
  const curatable = accessibleWhere<IDataset>(ability, 'curate', 'Dataset')
  const readable = accessibleWhere<IDataset>(ability, 'read', 'Dataset')
  if (!curatable || !readable) throw new ForbiddenError('The work queue is for data stewards.')
  const within = (filter: object) => ({ $and: [readable, filter] })
  const until = new Date(now.getTime() + EMBARGO_WINDOW_DAYS * 86_400_000)
  const [submitted, sentBack, ending, failed] = await Promise.all([
    em.find(
      Dataset,
      { $and: [curatable, { state: 'submitted' }] },
      { orderBy: { submittedAt: 'asc' }, limit: LIMIT },
    ),
    em.find(Dataset, within({ state: 'changes_requested' }), {
      orderBy: { updatedAt: 'desc' },
      limit: LIMIT,
    }),
    em.find(Dataset, within({ state: 'approved', embargoUntil: { $gt: now, $lte: until } }), {
      orderBy: { embargoUntil: 'asc' },
      limit: LIMIT,
    }),
    em.find(
      DatasetVersion,
      { doiStatus: 'failed' },
      { orderBy: { doiFailedAt: 'desc' }, limit: LIMIT },
    ),
  ])
  const failedDatasets = failed.length
    ? await em.find(Dataset, within({ id: { $in: failed.map((v) => v.dataset) } }))
    : []
  const byId = new Map(failedDatasets.map((d) => [d.id, d]))
  return {
    awaitingReview: submitted.map((d) => item('awaiting_review', d, d.submittedAt)),
    changesRequested: sentBack.map((d) => item('changes_requested', d, d.updatedAt)),
    embargoEnding: ending.map((d) => item('embargo_ending', d, d.embargoUntil)),
    doiFailed: failed.flatMap((v) => {
      const d = byId.get(v.dataset)
      return d
        ? [item('doi_failed', d, v.doiFailedAt, { version: v.number, detail: v.doiError })]
        : []
    }),
  }
}
