import type { EntityManager } from '@mikro-orm/better-sqlite'
import { computeCompleteness, type Completeness } from '@shared/metadata/completeness'
import type { DatasetMetadata as MetadataDocument } from '@shared/metadata/metadata.schema'
import { metadataJsonSchema } from '@shared/metadata/vocabulary'
import { ConflictError } from '../../errors/http-error'
import { accessibleWhere } from '../../http/access'
import type { Actor } from '../../services'
import { audit, continuesEditSession } from '../audit/audit.service'
import { Dataset, type IDataset } from '../datasets/dataset.entity'
import { DatasetFile } from '../files/dataset-file.entity'
import { Project } from '../projects/project.entity'
import { User } from '../users/user.entity'
import { DatasetMetadata } from './dataset-metadata.entity'
import type { DatasetExportSubject } from './exports/export-subject'
import { getPath, leaves } from './ome/metadata-paths'

export async function metadataOf(em: EntityManager, datasetId: number): Promise<MetadataDocument> {
  return (await em.findOne(DatasetMetadata, { dataset: datasetId }))?.document ?? {}
}

export async function completenessOf(em: EntityManager, dataset: IDataset): Promise<Completeness> {
  return computeCompleteness(await metadataOf(em, dataset.id), dataset)
}

/** Stores the whole document (already validated by the shared schema); drafts may be partial. */
export async function saveMetadata(
  em: EntityManager,
  actor: Actor,
  dataset: IDataset,
  document: MetadataDocument,
  now = new Date(),
) {
  const row = await em.findOne(DatasetMetadata, { dataset: dataset.id })
  const sameSession = continuesEditSession(
    row && { by: row.updatedBy, at: row.updatedAt },
    actor.user?.id,
    now,
  )
  if (row) {
    row.document = document
    row.updatedBy = actor.user?.id ?? null
    row.updatedAt = now
  } else {
    em.create(DatasetMetadata, {
      dataset: dataset.id,
      document,
      updatedBy: actor.user?.id ?? null,
      updatedAt: now,
    })
  }
  dataset.updatedAt = now
  if (!sameSession)
    audit(em, actor, {
      action: 'dataset.metadata',
      targetType: 'Dataset',
      targetId: dataset.accession,
      details: { fields: leaves(document).length },
      at: now,
    })
  await em.flush()
  return { metadata: document, completeness: computeCompleteness(document, dataset) }
}

/** Submitting needs every required field; the problem lists what is missing, field by field. */
export async function assertReadyToSubmit(em: EntityManager, dataset: IDataset) {
  const c = await completenessOf(em, dataset)
  if (c.readyToSubmit) return
  const missing = c.sections.flatMap((s) => s.missing.filter((f) => f.tier === 'required'))
  throw new ConflictError(
    `${dataset.accession} cannot be submitted yet: ${missing.length} required field${missing.length === 1 ? '' : 's'} missing.`,
    missing.map((f) => ({
      pointer: `#/${f.path.split('.').join('/')}`,
      detail: `${f.label} is required`,
    })),
  )
}

let suggestPaths: string[] | null = null
function suggestablePaths(): string[] {
  if (suggestPaths) return suggestPaths
  const out: string[] = []
  const walk = (node: Record<string, unknown>, path: string) => {
    if (node['x-suggest']) out.push(path)
    const props = node.properties as Record<string, Record<string, unknown>> | undefined
    for (const [k, v] of Object.entries(props ?? {})) walk(v, path ? `${path}.${k}` : k)
    const items = node.items as Record<string, unknown> | undefined
    if (items) walk(items, `${path}.*`)
  }
  walk(metadataJsonSchema(), '')
  return (suggestPaths = out)
}

/** Values already used in a project's datasets that this person may read, per suggestable field. */
export async function projectSuggestions(
  em: EntityManager,
  actor: Actor,
  projectId: number,
): Promise<Record<string, string[]>> {
  const allowed = accessibleWhere<IDataset>(actor.ability, 'read', 'Dataset')
  if (!allowed) return {}
  const ids = (
    await em.find(
      Dataset,
      { $and: [allowed, { project: projectId }] },
      { fields: ['id'], limit: 500, orderBy: { updatedAt: 'desc' } },
    )
  ).map((d) => d.id)
  const docs = ids.length ? await em.find(DatasetMetadata, { dataset: { $in: ids } }) : []
  const out: Record<string, string[]> = {}
  for (const pattern of suggestablePaths()) {
    const values = new Set<string>()
    for (const { document } of docs) {
      for (const value of expand(document, pattern))
        if (typeof value === 'string' && value.trim()) values.add(value.trim())
    }
    if (values.size) out[pattern] = [...values].sort((a, b) => a.localeCompare(b)).slice(0, 50)
  }
  return out
}

function expand(doc: unknown, pattern: string): unknown[] {
  const star = pattern.indexOf('.*')
  if (star < 0) return [getPath(doc, pattern)]
  const list = getPath(doc, pattern.slice(0, star))
  const rest = pattern.slice(star + 3)
  return Array.isArray(list) ? list.flatMap((item) => (rest ? expand(item, rest) : [item])) : []
}

/** Everything the exports need about one dataset. */
export async function exportSubject(
  em: EntityManager,
  dataset: IDataset,
  publicUrl: string,
): Promise<DatasetExportSubject> {
  const [metadata, project, creator, files] = await Promise.all([
    metadataOf(em, dataset.id),
    em.findOneOrFail(Project, { id: dataset.project }),
    dataset.createdBy != null ? em.findOne(User, { id: dataset.createdBy }) : Promise.resolve(null),
    em.find(DatasetFile, { dataset: dataset.id, status: 'ready' }, { orderBy: { name: 'asc' } }),
  ])
  const landingUrl = `${publicUrl}/datasets/${dataset.accession}`
  return {
    accession: dataset.accession,
    title: dataset.title,
    description: dataset.description,
    licence: dataset.licence,
    version: dataset.version,
    landingUrl,
    depositorName: creator?.name ?? null,
    projectName: project.name,
    submittedAt: dataset.submittedAt ?? null,
    approvedAt: dataset.approvedAt ?? null,
    embargoUntil: dataset.embargoUntil ?? null,
    files: files.map((f) => ({
      name: f.name,
      size: f.size,
      sha256: f.sha256 ?? null,
      mediaType: f.mediaType ?? null,
      url: `${publicUrl}/api/datasets/${dataset.accession}/files/${f.id}/content`,
    })),
    metadata,
  }
}
