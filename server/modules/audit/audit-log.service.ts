import type { EntityManager, FilterQuery } from '@mikro-orm/better-sqlite'
import { auditActionLabel, describeAuditDetails } from '@shared/domain/audit-actions'
import type { AuditEventDto, AuditFilter } from '@shared/schemas/audit.schema'
import { parseVersionLabel } from '@shared/schemas/dataset-version.schema'
import { Dataset } from '../datasets/dataset.entity'
import { Manuscript } from '../manuscripts/manuscript.entity'
import { Project } from '../projects/project.entity'
import { ApiToken } from '../tokens/api-token.entity'
import { DatasetVersion } from '../versions/dataset-version.entity'
import { User } from '../users/user.entity'
import { userIdsContaining } from '../users/user-text-search'
import { AuditEvent, type IAuditEvent } from './audit-event.entity'

/** A date alone as an upper bound means the whole of that day (UTC). */
function instant(value: string, endOfDay: boolean): Date {
  if (/^\d{4}-\d{2}-\d{2}$/.test(value)) {
    const day = new Date(`${value}T00:00:00Z`)
    return endOfDay ? new Date(day.getTime() + 86_400_000) : day
  }
  return new Date(value)
}

/** A dataset's events and those of its frozen versions (their DOIs are registered per version). */
async function datasetEvents(
  em: EntityManager,
  accession: string,
): Promise<FilterQuery<IAuditEvent>> {
  const own = { targetType: 'Dataset', targetId: accession }
  // Two short lookups by unique keys: the version's dataset is a bare id to the ORM's types.
  const dataset = await em.findOne(Dataset, { accession }, { fields: ['id'] })
  const versions = dataset
    ? await em.find(DatasetVersion, { dataset: dataset.id }, { fields: ['label'] })
    : []
  if (!versions.length) return own
  const labels = versions.map((v) => v.label)
  return { $or: [own, { targetType: 'DatasetVersion', targetId: { $in: labels } }] }
}

/** The steward's filters as one ORM condition; null when they can match nothing. */
async function whereOf(
  em: EntityManager,
  f: AuditFilter,
): Promise<FilterQuery<IAuditEvent> | null> {
  const and: FilterQuery<IAuditEvent>[] = []
  if (f.targetType) and.push({ targetType: f.targetType })
  if (f.targetId) and.push({ targetId: f.targetId })
  if (f.accession) and.push(await datasetEvents(em, f.accession.toUpperCase()))
  if (f.action) and.push({ action: f.action })
  if (f.from) and.push({ time: { $gte: instant(f.from, false) } })
  if (f.to) and.push({ time: { $lt: instant(f.to, true) } })
  if (f.actor) {
    if (f.actor.toLowerCase() === 'system') and.push({ actor: null })
    else {
      const people = await userIdsContaining(em, f.actor, 500)
      if (!people.length) return null
      and.push({ actor: { $in: people } })
    }
  }
  return and.length ? { $and: and } : {}
}

/** The accession of the dataset an event's target belongs to (a dataset or one of its versions). */
function datasetOf(r: IAuditEvent): string | null {
  if (r.targetType === 'Dataset') return r.targetId
  if (r.targetType === 'DatasetVersion') return parseVersionLabel(r.targetId)?.accession ?? null
  return null
}

/** Ids of one target type that name rows (numbers), to be looked up together. */
const idsOf = (rows: IAuditEvent[], type: string) =>
  rows
    .filter((r) => r.targetType === type && /^\d+$/.test(r.targetId))
    .map((r) => Number(r.targetId))

/**
 * Rows into what people read: who acted by name, what was acted on by accession, person, token,
 * project or manuscript name, the action and its details in words, never a type name of the code.
 * Names are looked up once per page.
 */
async function toDtos(em: EntityManager, rows: IAuditEvent[]): Promise<AuditEventDto[]> {
  const userIds = new Set<number>(idsOf(rows, 'User'))
  for (const r of rows) {
    if (r.actor != null) userIds.add(r.actor)
    const detailUser = r.details?.user
    if (typeof detailUser === 'number') userIds.add(detailUser)
  }
  const some = <T>(ids: Iterable<number>, find: (ids: number[]) => Promise<T[]>) => {
    const list = [...ids]
    return list.length ? find(list) : Promise.resolve([] as T[])
  }
  const [users, tokens, projects, manuscripts] = await Promise.all([
    some(userIds, (ids) => em.find(User, { id: { $in: ids } })),
    some(idsOf(rows, 'ApiToken'), (ids) => em.find(ApiToken, { id: { $in: ids } })),
    some(idsOf(rows, 'Project'), (ids) => em.find(Project, { id: { $in: ids } })),
    some(idsOf(rows, 'Manuscript'), (ids) => em.find(Manuscript, { id: { $in: ids } })),
  ])
  const person = new Map(users.map((u) => [u.id, u.name || u.email]))
  const token = new Map(tokens.map((t) => [t.id, t.name]))
  const project = new Map(projects.map((p) => [p.id, p.name]))
  const manuscript = new Map(manuscripts.map((m) => [m.id, m.reference]))
  const targetLabel = (r: IAuditEvent) => {
    const id = Number(r.targetId)
    switch (r.targetType) {
      case 'User':
        return person.get(id) ?? 'a removed person'
      case 'ApiToken':
        return `token “${token.get(id) ?? r.targetId}”`
      case 'Dataset':
        return r.targetId
      case 'DatasetVersion': {
        const version = parseVersionLabel(r.targetId)
        return version ? `${version.accession}, version ${version.number}` : r.targetId
      }
      case 'Project':
        return project.has(id) ? `project “${project.get(id)}”` : 'a removed project'
      case 'Manuscript':
        return manuscript.has(id) ? `manuscript ${manuscript.get(id)}` : 'a removed manuscript'
      case 'InstrumentProfile':
        return `instrument profile “${r.targetId}”`
      case 'LinkCheck':
        return 'a data availability statement'
      default:
        return r.targetId
    }
  }
  return rows.map((r) => ({
    id: r.id,
    actor: r.actor ?? null,
    actorName: r.actor == null ? null : (person.get(r.actor) ?? 'a removed person'),
    action: r.action,
    actionLabel: auditActionLabel(r.action),
    targetType: r.targetType,
    targetId: r.targetId,
    targetLabel: targetLabel(r),
    targetDataset: datasetOf(r),
    time: r.time.toISOString(),
    address: r.address ?? null,
    details: r.details ?? null,
    summary: describeAuditDetails(r.details ?? null, (id) => person.get(id)),
  }))
}

/** One page of the log, newest first. */
export async function listAuditEvents(
  em: EntityManager,
  filter: AuditFilter & { limit: number; offset: number },
) {
  const where = await whereOf(em, filter)
  if (!where) return { items: [], total: 0 }
  const [rows, total] = await em.findAndCount(AuditEvent, where, {
    orderBy: { time: 'desc', id: 'desc' },
    limit: filter.limit,
    offset: filter.offset,
  })
  return { items: await toDtos(em, rows), total }
}

/** The most rows one export holds; a narrower filter gets the rest. */
export const AUDIT_EXPORT_MAX_ROWS = 50_000

const CSV_COLUMNS = ['time_utc', 'actor', 'action', 'target', 'details', 'address'] as const

/**
 * A field as RFC 4180 wants it; a leading = + - @ is neutralised so a spreadsheet opening the
 * export never runs what someone typed into a reason or a title.
 */
function csvField(value: string): string {
  const safe = /^[=+\-@\t\r]/.test(value) ? `'${value}` : value
  return /[",\r\n]/.test(safe) ? `"${safe.replace(/"/g, '""')}"` : safe
}

/** The filtered log as CSV (newest first), with the same words as the page. */
export async function exportAuditCsv(em: EntityManager, filter: AuditFilter): Promise<string> {
  const where = await whereOf(em, filter)
  const rows = where
    ? await em.find(AuditEvent, where, {
        orderBy: { time: 'desc', id: 'desc' },
        limit: AUDIT_EXPORT_MAX_ROWS,
      })
    : []
  const dtos = await toDtos(em, rows)
  const lines = dtos.map((e) =>
    [e.time, e.actorName ?? 'system', e.actionLabel, e.targetLabel, e.summary, e.address ?? '']
      .map(csvField)
      .join(','),
  )
  return [CSV_COLUMNS.join(','), ...lines].join('\r\n') + '\r\n'
}
