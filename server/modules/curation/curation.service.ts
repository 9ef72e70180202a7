import type { EntityManager } from '@mikro-orm/better-sqlite'
import { canReadCurationThread } from '@shared/domain/curation-access'
import type { AppAbility } from '@shared/permissions/abilities'
import type {
  CurationChecklist,
  CurationCheckDto,
  CurationStep,
  CurationThreadDto,
} from '@shared/schemas/curation.schema'
import { NotFoundError } from '../../errors/http-error'
import type { AppDeps } from '../../services'
import type { IDataset } from '../datasets/dataset.entity'
import { User } from '../users/user.entity'
import { curationChecks } from './curation-checks'
import { CurationEntry } from './curation-entry.entity'

type Notify = Pick<AppDeps, 'mailer' | 'config'>

/** The thread's readers: see canReadCurationThread (shared with the client). */
export function canReadThread(ability: AppAbility, dataset: IDataset): boolean {
  return canReadCurationThread(ability, {
    id: dataset.id,
    project: dataset.project,
    state: dataset.state,
    embargoUntil: dataset.embargoUntil ?? null,
  })
}

export function assertCanReadThread(ability: AppAbility, dataset: IDataset) {
  if (!canReadThread(ability, dataset))
    throw new NotFoundError('curation thread', dataset.accession)
}

/** Adds one step to the thread, in the caller's unit of work. */
export function recordCurationStep(
  em: EntityManager,
  dataset: IDataset,
  entry: {
    step: CurationStep
    actor: number | null
    comment?: string
    checks?: CurationCheckDto[]
    checklist?: CurationChecklist
    version?: number
  },
  now: Date,
) {
  return em.create(CurationEntry, {
    dataset: dataset.id,
    step: entry.step,
    version: entry.version ?? dataset.version,
    actor: entry.actor,
    comment: entry.comment ?? '',
    checks: entry.checks ?? [],
    checklist: entry.checklist ?? {},
    createdAt: now,
  })
}

export async function curationThread(
  em: EntityManager,
  dataset: IDataset,
  policy: { maxYears: number },
  now: Date,
): Promise<CurationThreadDto> {
  const entries = await em.find(
    CurationEntry,
    { dataset: dataset.id },
    { orderBy: { createdAt: 'asc', id: 'asc' } },
  )
  const actorIds = [
    ...new Set(entries.map((e) => e.actor).filter((id): id is number => id != null)),
  ]
  const actors = actorIds.length
    ? await em.find(User, { id: { $in: actorIds } }, { fields: ['name'] })
    : []
  const name = new Map(actors.map((u) => [u.id, u.name]))
  return {
    entries: entries.map((e) => ({
      id: e.id,
      step: e.step,
      version: e.version,
      actorName: e.actor != null ? (name.get(e.actor) ?? null) : null,
      comment: e.comment,
      checks: e.checks,
      checklist: e.checklist,
      createdAt: e.createdAt.toISOString(),
    })),
    checks: await curationChecks(em, dataset, policy, now),
    embargoMaxYears: policy.maxYears,
  }
}

/** Mails the dataset's depositor (its creator) about a step, with the link to the thread. */
export async function notifyDepositor(
  em: EntityManager,
  deps: Notify,
  dataset: IDataset,
  subject: string,
  text: string,
) {
  if (dataset.createdBy == null) return
  const depositor = await em.findOne(User, { id: dataset.createdBy })
  if (!depositor) return
  const link = `${deps.config.publicUrl}/datasets/${dataset.accession}#curation`
  await deps.mailer.send({
    to: depositor.email,
    subject,
    text: `${text}\n\nThe curation thread: ${link}\n`,
  })
}
