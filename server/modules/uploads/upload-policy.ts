import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { Request } from 'express'
import { datasetSubject, defineAbilityFor, type AppAbility } from '@shared/permissions/abilities'
import type { AppConfig } from '../../config'
import { findDataset } from '../datasets/dataset-access'
import { Dataset, type IDataset } from '../datasets/dataset.entity'
import { FileNameError, safeFileName } from '../files/file-names'
import { projectBytesUsed } from '../files/project-usage'
import { loadViewer } from '../users/viewer.service'
import { User } from '../users/user.entity'
import { refuse } from './upload-errors'

/** Bytes in the largest binary unit that keeps the number readable (MiB for small quotas). */
const gib = (bytes: number) =>
  bytes < 1024 ** 3
    ? `${(bytes / 1024 ** 2).toFixed(2)} MiB`
    : `${(bytes / 1024 ** 3).toFixed(bytes < 10 * 1024 ** 3 ? 2 : 0)} GiB`

const NOT_EDITABLE = (accession: string) =>
  refuse(
    403,
    'Not allowed',
    `Files can be added to ${accession} only by its project's depositors while it is a draft or sent back for changes.`,
  )

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
  if (idOrAccession.includes('\u0000') || idOrAccession.length > 40)
    throw refuse(400, 'Bad metadata', 'The "dataset" metadata is not an id or an accession.')
  const dataset = await findDataset(em, idOrAccession)
  if (!dataset || !req.ability.can('read', datasetSubject(dataset)))
    throw refuse(404, 'Not found', `No dataset "${idOrAccession}".`)
  if (!req.ability.can('edit', datasetSubject(dataset))) throw NOT_EDITABLE(dataset.accession)
  return dataset
}

/** The abilities of an upload's owner when no request carries them (start-up repair). */
export async function uploaderAbility(em: EntityManager, userId: number): Promise<AppAbility> {
  const user = await em.findOne(User, { id: userId })
  return defineAbilityFor(user ? await loadViewer(em, user) : null)
}

/**
 * Why an upload under way may not go on (its dataset was deleted, or submitted, or the uploader
 * lost the right to edit it), or null when it may.
 */
export async function targetRefusal(
  em: EntityManager,
  ability: AppAbility,
  datasetId: number,
): Promise<ReturnType<typeof refuse> | null> {
  const dataset = datasetId ? await em.findOne(Dataset, { id: datasetId }) : null
  if (!dataset || !ability.can('read', datasetSubject(dataset)))
    return refuse(
      404,
      'Dataset gone',
      'The dataset this upload was for no longer exists; the bytes received were removed.',
    )
  if (!ability.can('edit', datasetSubject(dataset)))
    return refuse(
      403,
      'Not allowed',
      `${dataset.accession} no longer takes new files (it was submitted, or you are no longer a depositor of its project); the bytes received were removed.`,
    )
  return null
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
  const used = await projectBytesUsed(em, dataset.project)
  const quota = config.uploads.projectQuotaBytes
  if (used + size > quota) {
    throw refuse(
      413,
      'Project quota exceeded',
      `This file (${gib(size)}) would take the project to ${gib(used + size)}, over its quota of ${gib(quota)}. Ask a site admin for more space.`,
    )
  }
}
