import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { LocalStorage } from '../../storage/local-storage'
import { UploadReservation } from '../uploads/upload-reservation.entity'
import { DatasetFile } from './dataset-file.entity'

/**
 * Bytes younger than this are left alone: an upload being registered has its original moved a
 * moment before its row commits.
 */
const GRACE_MS = 60_000

export interface SweepResult {
  originals: number
  derived: number
  uploads: number
}

/**
 * Finds and removes bytes no record owns: originals with no file row, derived folders of files
 * that are gone, and unfinished uploads with neither a tus record nor a quota reservation. Runs
 * after the start-up repair (which registers what a crash interrupted) and every hour.
 */
export async function sweepOrphanedBytes(
  em: EntityManager,
  storage: LocalStorage,
  graceMs = GRACE_MS,
): Promise<SweepResult> {
  const result: SweepResult = { originals: 0, derived: 0, uploads: 0 }
  const uploads = new Set<string>()
  for await (const upload of storage.uploadEntries()) {
    uploads.add(upload.id)
    if (upload.ageMs < graceMs || upload.hasRecord) continue
    if (await em.count(UploadReservation, { uploadId: upload.id })) continue
    await storage.removeUpload(upload.id)
    result.uploads++
  }
  for await (const { key, ageMs } of storage.storedOriginals()) {
    if (ageMs < graceMs || uploads.has(key.split('/')[1] ?? '')) continue
    if (await em.count(DatasetFile, { storageKey: key })) continue
    await storage.removeOriginal(key)
    result.originals++
  }
  for await (const { fileId, ageMs } of storage.derivedFolders()) {
    if (ageMs < graceMs || (await em.count(DatasetFile, { id: fileId }))) continue
    await storage.removeDerived(fileId)
    result.derived++
  }
  return result
}
