import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { Request } from 'express'
import { datasetSubject } from '@shared/permissions/abilities'
import type { AppConfig } from '../../config'
import { findDataset } from '../datasets/dataset-access'
import type { IDataset } from '../datasets/dataset.entity'
import { FileNameError, safeFileName } from '../files/file-names'
import { refuse } from './upload-errors'

const gib = (bytes: number) => `${(bytes / 1024 ** 3).toFixed(bytes < 10 * 1024 ** 3 ? 2 : 0)} GiB`

/** The dataset an upload targets, if the uploader may add files to it (its `edit` right). */
export async function uploadTarget(
  em: EntityManager,
  req: Request,
  idOrAccession: string | null | undefined,
): Promise<IDataset> {
  if (!idOrAccession)
    throw refuse(
      400,
      'Missing metadata',
      'Say which dataset the file belongs to: Upload-Metadata "dataset" (id or accession).',
    )
  const dataset = await findDataset(em, idOrAccession)
  if (!dataset || !req.ability.can('read', datasetSubject(dataset)))
    throw refuse(404, 'Not found', `No dataset "${idOrAccession}".`)
  if (!req.ability.can('edit', datasetSubject(dataset))) {
    throw refuse(
      403,
      'Not allowed',
      `Files can be added to ${dataset.accession} only by its project's depositors while it is a draft or sent back for changes.`,
    )
  }
  return dataset
}

export function uploadName(raw: string | null | undefined): string {
  if (!raw) throw refuse(400, 'Missing metadata', 'Give the file name: Upload-Metadata "filename".')
  try {
    return safeFileName(raw)
  } catch (err) {
    throw refuse(
      400,
      'Bad file name',
      err instanceof FileNameError ? err.message : 'Unusable file name.',
    )
  }
}

/** Refuses an upload that would take the project past its quota (files plus uploads in progress). */
export async function checkQuota(
  em: EntityManager,
  config: AppConfig,
  dataset: IDataset,
  size: number,
) {
  const knex = em.getKnex()
  const [files, pending] = await Promise.all([
    knex('dataset_file as f')
      .join('dataset as d', 'd.id', 'f.dataset_id')
      .where('d.project_id', dataset.project)
      .sum({ total: 'f.size' })
      .first(),
    knex('upload_reservation').where('project_id', dataset.project).sum({ total: 'size' }).first(),
  ])
  const used = Number(files?.total ?? 0) + Number(pending?.total ?? 0)
  const quota = config.uploads.projectQuotaBytes
  if (used + size > quota) {
    throw refuse(
      413,
      'Project quota exceeded',
      `This file (${gib(size)}) would take the project to ${gib(used + size)}, over its quota of ${gib(quota)}. Ask a site admin for more space.`,
    )
  }
}
