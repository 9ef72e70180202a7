import type { EntityManager } from '@mikro-orm/better-sqlite'
import { datasetSubject } from '@shared/permissions/abilities'
import type {
  CreateDatasetBody,
  DatasetDto,
  UpdateDatasetBody,
} from '@shared/schemas/dataset.schema'
import { formatAccession } from '@shared/domain/dataset-state'
import { DEFAULT_LICENCE } from '@shared/domain/licences'
import { ForbiddenError, NotFoundError, ValidationError } from '../../errors/http-error'
import type { Actor } from '../../services'
import { audit } from '../audit/audit.service'
import { nextSequenceValue } from '../common/sequence.service'
import type { LocalStorage } from '../../storage/local-storage'
import { DatasetFile } from '../files/dataset-file.entity'
import { Project } from '../projects/project.entity'
import { Dataset, type IDataset } from './dataset.entity'
import { parseDay, toDatasetDto } from './dataset.mapper'
import { assertNoApprovedVersions } from '../versions/versions.service'

export async function createDataset(
  em: EntityManager,
  actor: Actor,
  input: CreateDatasetBody,
): Promise<DatasetDto> {
  const { projectId, title, description, licence } = input
  const project = await em.findOne(Project, { id: projectId })
  if (!project || !actor.ability.can('read', { __type: 'Project', id: projectId })) {
    throw new ValidationError([
      { pointer: '#/projectId', detail: `No project ${projectId} that you can see.` },
    ])
  }
  const draft = datasetSubject({ id: 0, project: projectId, state: 'draft', embargoUntil: null })
  if (!actor.ability.can('create', draft)) {
    throw new ForbiddenError(
      `Only owners and members of "${project.name}" can create datasets in it.`,
    )
  }
  const dataset = await em.transactional(async (tem) => {
    const accession = formatAccession(await nextSequenceValue(tem, 'accession'))
    const created = tem.create(Dataset, {
      accession,
      title,
      description,
      project: projectId,
      licence: licence ?? DEFAULT_LICENCE,
      createdBy: actor.user?.id ?? null,
    })
    await tem.flush()
    audit(tem, actor, {
      action: 'dataset.create',
      targetType: 'Dataset',
      targetId: accession,
      details: { title },
    })
    return created
  })
  return toDatasetDto(em, dataset)
}

export async function updateDataset(
  em: EntityManager,
  actor: Actor,
  dataset: IDataset,
  changes: UpdateDatasetBody,
) {
  const { proposedEmbargoUntil, ...rest } = changes
  em.assign(dataset, rest)
  if (proposedEmbargoUntil !== undefined) {
    const day = parseDay(proposedEmbargoUntil)
    if (day && day.getTime() <= Date.now()) {
      throw new ValidationError([
        { pointer: '#/proposedEmbargoUntil', detail: 'An embargo must end in the future.' },
      ])
    }
    dataset.proposedEmbargoUntil = day
  }
  audit(em, actor, {
    action: 'dataset.update',
    targetType: 'Dataset',
    targetId: dataset.accession,
    details: { fields: Object.keys(changes) },
  })
  await em.flush()
  return toDatasetDto(em, dataset)
}

/**
 * Deletes a dataset and every byte it owned. The rows go first (files, jobs and shares cascade);
 * should the process stop before the bytes are gone, the orphan sweep removes them later.
 */
export async function deleteDataset(
  em: EntityManager,
  actor: Actor,
  dataset: IDataset,
  storage: LocalStorage,
) {
  await assertNoApprovedVersions(em, dataset)
  const files = await em.find(DatasetFile, { dataset: dataset.id }, { fields: ['id'] })
  audit(em, actor, { action: 'dataset.delete', targetType: 'Dataset', targetId: dataset.accession })
  em.remove(dataset)
  await em.flush()
  await storage.removeDataset(
    dataset.id,
    files.map((f) => f.id),
  )
}

export async function getDatasetOr404(em: EntityManager, id: number): Promise<IDataset> {
  const dataset = await em.findOne(Dataset, { id })
  if (!dataset) throw new NotFoundError('dataset', id)
  return dataset
}
