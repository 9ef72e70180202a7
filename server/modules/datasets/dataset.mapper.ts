import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { DatasetDto, StewardNoteDto } from '@shared/schemas/dataset.schema'
import { AuditEvent } from '../audit/audit-event.entity'
import { Project } from '../projects/project.entity'
import { User } from '../users/user.entity'
import type { IDataset } from './dataset.entity'

const iso = (d: Date | null | undefined) => (d ? d.toISOString() : null)
const day = (d: Date | null | undefined) => (d ? d.toISOString().slice(0, 10) : null)

/** Maps datasets to DTOs, loading their projects' and creators' names in one query each. */
export async function toDatasetDtos(
  em: EntityManager,
  datasets: IDataset[],
): Promise<DatasetDto[]> {
  if (!datasets.length) return []
  const projectIds = [...new Set(datasets.map((d) => d.project))]
  const userIds = [
    ...new Set(datasets.map((d) => d.createdBy).filter((id): id is number => id != null)),
  ]
  const [projects, users] = await Promise.all([
    em.find(Project, { id: { $in: projectIds } }, { fields: ['name'], disableIdentityMap: true }),
    userIds.length
      ? em.find(User, { id: { $in: userIds } }, { fields: ['name'], disableIdentityMap: true })
      : Promise.resolve([]),
  ])
  const projectName = new Map(projects.map((p) => [p.id, p.name]))
  const userName = new Map(users.map((u) => [u.id, u.name]))
  return datasets.map((d) => ({
    id: d.id,
    accession: d.accession,
    title: d.title,
    description: d.description,
    project: { id: d.project, name: projectName.get(d.project) ?? '' },
    state: d.state,
    embargoUntil: day(d.embargoUntil),
    proposedEmbargoUntil: day(d.proposedEmbargoUntil),
    licence: d.licence,
    version: d.version,
    createdBy:
      d.createdBy != null ? { id: d.createdBy, name: userName.get(d.createdBy) ?? '' } : null,
    createdAt: d.createdAt.toISOString(),
    updatedAt: d.updatedAt.toISOString(),
    submittedAt: iso(d.submittedAt),
    approvedAt: iso(d.approvedAt),
  }))
}

export async function toDatasetDto(em: EntityManager, dataset: IDataset): Promise<DatasetDto> {
  const [dto] = await toDatasetDtos(em, [dataset])
  return dto!
}

/** `YYYY-MM-DD` → that day at 00:00 UTC. */
export const parseDay = (s: string | null | undefined): Date | null =>
  s ? new Date(`${s}T00:00:00Z`) : null

const NOTE_ACTIONS = { changes_requested: 'dataset.request_changes', withdrawn: 'dataset.withdraw' }

/**
 * One dataset as its page shows it: with the steward's comment that sent it back or withdrew it
 * (kept in the audit event of that decision), so the page can say what must change or why it went.
 */
export async function toDatasetPageDto(em: EntityManager, dataset: IDataset): Promise<DatasetDto> {
  const dto = await toDatasetDto(em, dataset)
  const action = NOTE_ACTIONS[dataset.state as keyof typeof NOTE_ACTIONS]
  if (!action) return { ...dto, stewardNote: null }
  const event = await em.findOne(
    AuditEvent,
    { targetType: 'Dataset', targetId: dataset.accession, action },
    { orderBy: { time: 'desc', id: 'desc' } },
  )
  const comment = event?.details?.comment
  const stewardNote: StewardNoteDto | null = event
    ? {
        decision: dataset.state === 'withdrawn' ? 'withdraw' : 'request_changes',
        comment: typeof comment === 'string' ? comment : '',
        at: event.time.toISOString(),
      }
    : null
  return { ...dto, stewardNote }
}
