import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { LocalStorage } from '../../storage/local-storage'
import { UploadReservation } from '../uploads/upload-reservation.entity'
import { DatasetFile } from './dataset-file.entity'

/**
 * Bytes younger than this are left alone: an upload being registered has its original moved a
 * moment before its row commits.
 */
const GRACE_MS = 60_000
/** Listed keys are checked against the records this many at a time. */
const LOOKUP_BATCH = 500

export interface SweepResult {
  originals: number
  derived: number
  uploads: number
}

/** Runs a sweep of the bucket for one tick on one node only (null on the others). */
export type OncePerTick = (
  at: Date,
  work: () => Promise<SweepResult>,
) => Promise<SweepResult | null>

/**
 * The upkeep's sweep: this node's data folder (the record on the embedded default; on the S3
 * profile the node's copies, and uploads still written there), then on the S3 profile the
 * bucket, by one node per tick when nodes share a database.
 */
export async function sweepStoredBytes(
  em: EntityManager,
  storage: LocalStorage,
  options: { now: Date; oncePerTick?: OncePerTick; graceMs?: number },
): Promise<SweepResult> {
  const local = await sweepOrphanedBytes(em, storage, options.graceMs)
  if (!storage.bucket) return local
  const sweep = () => sweepOrphanedObjects(em, storage, options.now, options.graceMs)
  const shared = options.oncePerTick ? await options.oncePerTick(options.now, sweep) : await sweep()
  return {
    originals: local.originals + (shared?.originals ?? 0),
    derived: local.derived + (shared?.derived ?? 0),
    uploads: local.uploads + (shared?.uploads ?? 0),
  }
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

/**
 * The same sweep over the bucket (S3 profile), by listing: originals under `files/` with no file
 * row and no upload in progress under `uploads/`, and `derived/<file>/` prefixes of files that
 * are gone, each once older than the grace period by its objects' `lastModified` (a derived
 * prefix by its newest object). Unfinished uploads in the bucket are the tus store's to expire.
 * Listings are paged and unordered: keys are checked against the records in batches.
 */
export async function sweepOrphanedObjects(
  em: EntityManager,
  storage: LocalStorage,
  now: Date,
  graceMs = GRACE_MS,
): Promise<SweepResult> {
  const result: SweepResult = { originals: 0, derived: 0, uploads: 0 }
  const bucket = storage.bucket
  if (!bucket) return result
  const old = (at: number) => now.getTime() - at >= graceMs

  const uploading = new Set<string>()
  for await (const { key } of bucket.list('uploads/'))
    uploading.add(key.slice('uploads/'.length).replace(/\.(info|part)$/, ''))

  let candidates: string[] = []
  const removeUnowned = async () => {
    const owned = await em.find(
      DatasetFile,
      { storageKey: { $in: candidates } },
      { fields: ['storageKey'] },
    )
    const known = new Set(owned.map((f) => f.storageKey))
    for (const key of candidates.filter((k) => !known.has(k))) {
      await storage.mirror.remove(storage.originalKey(key))
      result.originals++
    }
    candidates = []
  }
  for await (const object of bucket.list('files/')) {
    const storageKey = object.key.slice('files/'.length)
    const upload = storageKey.split('/')[1]
    if (!upload || uploading.has(upload) || !old(object.lastModified.getTime())) continue
    candidates.push(storageKey)
    if (candidates.length >= LOOKUP_BATCH) await removeUnowned()
  }
  if (candidates.length) await removeUnowned()

  const newest = new Map<number, number>()
  for await (const object of bucket.list('derived/')) {
    const id = /^derived\/(\d+)\//.exec(object.key)?.[1]
    if (!id) continue
    const at = object.lastModified.getTime()
    newest.set(Number(id), Math.max(newest.get(Number(id)) ?? at, at))
  }
  const aged = [...newest].filter(([, at]) => old(at)).map(([id]) => id)
  for (let i = 0; i < aged.length; i += LOOKUP_BATCH) {
    const ids = aged.slice(i, i + LOOKUP_BATCH)
    const owned = await em.find(DatasetFile, { id: { $in: ids } }, { fields: ['id'] })
    const known = new Set(owned.map((f) => f.id))
    for (const id of ids.filter((fileId) => !known.has(fileId))) {
      await storage.removeDerived(id)
      result.derived++
    }
  }
  return result
}
