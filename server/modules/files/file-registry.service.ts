import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { Upload } from '@tus/server'
import type { LocalStorage } from '../../storage/local-storage'
import { audit } from '../audit/audit.service'
import { Dataset } from '../datasets/dataset.entity'
import { uploadBytesOf } from '../uploads/upload-bytes'
import { UploadReservation } from '../uploads/upload-reservation.entity'
import { DUPLICATE_FILE_PROBLEM, refuse } from '../uploads/upload-errors'
import { DatasetFile, type IDatasetFile } from './dataset-file.entity'
import { queueFirstJob } from './file-jobs'

export interface FinishedUpload {
  upload: Upload
  sha256: string
  size: number
  userId: number
  ip: string | null
  /** Set when a crash came between moving the bytes and recording the file. */
  alreadyMoved?: boolean
}

/** The name a file gets in its dataset: the depositor's, with " (2)" etc. if it is already taken. */
async function uniqueName(em: EntityManager, datasetId: number, name: string): Promise<string> {
  const taken = new Set(
    (await em.find(DatasetFile, { dataset: datasetId }, { fields: ['name'] })).map((f) => f.name),
  )
  if (!taken.has(name)) return name
  const dot = name.lastIndexOf('.')
  const [stem, ext] = dot > 0 ? [name.slice(0, dot), name.slice(dot)] : [name, '']
  for (let i = 2; ; i++) if (!taken.has(`${stem} (${i})${ext}`)) return `${stem} (${i})${ext}`
}

export const storageKeyFor = (datasetId: number, uploadId: string) => `${datasetId}/${uploadId}`

/**
 * Turns a finished upload into a dataset file. Order matters for crash safety: the bytes are moved
 * to their permanent key first (deterministic from the upload id: a rename on the local disk, an
 * object copy and delete in the bucket), then the row, the first processing job and the audit
 * event commit together; reconcileUploads() completes any step a crash interrupted. An empty file
 * or an exact duplicate in the same dataset is refused and its bytes are removed.
 */
export async function registerUpload(
  em: EntityManager,
  storage: LocalStorage,
  f: FinishedUpload,
): Promise<IDatasetFile> {
  const datasetId = Number(f.upload.metadata?.datasetId)
  const bytes = uploadBytesOf(storage)
  const key = storageKeyFor(datasetId, f.upload.id)
  const existing = await em.findOne(DatasetFile, { storageKey: key })
  if (existing) return existing

  const fail = async (status: number, title: string, detail: string, extra = {}) => {
    await bytes.dropUpload(f.upload.id)
    await em.nativeDelete(UploadReservation, { uploadId: f.upload.id })
    return refuse(status, title, detail, extra)
  }
  if (f.size === 0)
    throw await fail(400, 'Empty file', 'The file is empty (0 bytes); nothing was stored.')
  const twin = await em.findOne(DatasetFile, { dataset: datasetId, sha256: f.sha256 })
  if (twin) {
    throw await fail(
      400,
      'Duplicate file',
      `This file is identical (same SHA-256) to "${twin.name}", already in the dataset; it was not stored twice.`,
      {
        type: DUPLICATE_FILE_PROBLEM,
        existingFileId: twin.id,
        sha256: twin.sha256,
      },
    )
  }

  if (!f.alreadyMoved) await bytes.move(f.upload.id, key)
  const { kind, mediaType } = await bytes.kindOf(key, String(f.upload.metadata?.filename ?? ''))
  const name = String(f.upload.metadata?.filename ?? 'file')
  try {
    // The row, its first job, the audit event and the end of the reservation commit together:
    // a crash leaves either all of them or none (and the bytes, which reconcile() picks up).
    return await em.transactional(async (tem) => {
      const dataset = await tem.findOne(Dataset, { id: datasetId })
      if (!dataset)
        throw refuse(404, 'Dataset gone', 'The dataset this upload was for no longer exists.')
      const file = tem.create(DatasetFile, {
        dataset: datasetId,
        name: await uniqueName(tem, datasetId, name),
        size: f.size,
        sha256: f.sha256,
        kind,
        mediaType,
        status: kind === 'localization_table' || kind === 'raw_stack' ? 'processing' : 'ready',
        storageKey: key,
        createdBy: f.userId,
      })
      await tem.flush()
      await queueFirstJob(tem, file)
      dataset.updatedAt = new Date()
      audit(
        tem,
        { user: { id: f.userId }, ip: f.ip ?? undefined },
        {
          action: 'file.upload',
          targetType: 'Dataset',
          targetId: dataset.accession,
          details: { file: file.name, size: f.size, sha256: f.sha256, kind },
        },
      )
      await tem.nativeDelete(UploadReservation, { uploadId: f.upload.id })
      return file
    })
  } catch (err) {
    // Refused after the move (the dataset went away): the bytes have no owner; remove them.
    if ((err as { status_code?: number }).status_code) {
      await bytes.dropOriginal(key)
      await em.nativeDelete(UploadReservation, { uploadId: f.upload.id })
    }
    throw err
  }
}
