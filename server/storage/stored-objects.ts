import { createReadStream } from 'node:fs'
import type { Readable } from 'node:stream'
import type { LocalStorage } from './local-storage'
import { ObjectNotFoundError, type ObjectStore } from './object-store'

/*
 * Reading, counting and removing stored bytes by key, the same code on both profiles: on the
 * embedded default the data folder is the record and LocalStorage's own methods do the work
 * unchanged; on the S3 profile the bucket is the record, walked by listing (paged, unordered).
 */

/** The key of a deposited file's original (`files/<dataset>/<upload id>`). */
export const originalKey = (storageKey: string) => `files/${storageKey}`
/** Everything computed from one file lies under this prefix. */
export const derivedPrefix = (fileId: number) => `derived/${fileId}/`
export const derivedKey = (fileId: number, name: string) => `${derivedPrefix(fileId)}${name}`
/** The frozen bytes of approved versions, one object per SHA-256. */
export const versionBlobKey = (sha256: string) => `version-blobs/${sha256}`

/** Deletes in flight at once while removing by listing (S3 deletes one key per request here). */
const DELETES_IN_FLIGHT = 16

/**
 * A stored object's bytes as a stream: from the bucket on the S3 profile, from the data folder
 * otherwise. An object the bucket lacks is read from this node's folder: until uploads and job
 * outputs are written to the bucket, new originals and derived files are still only there.
 */
export async function openStored(storage: LocalStorage, key: string): Promise<Readable> {
  if (storage.bucket) {
    try {
      return (await storage.bucket.get(key)).stream
    } catch (err) {
      if (!(err instanceof ObjectNotFoundError)) throw err
    }
  }
  const path = storage.mirror.pathOf(key)
  // Opened before it is handed on, so a missing file is an error here, not mid-stream.
  const stream = createReadStream(path)
  await new Promise<void>((resolve, reject) => {
    stream.once('open', () => resolve())
    stream.once('error', reject)
  })
  return stream
}

/** Total size of the objects under a prefix. */
export async function bytesUnder(bucket: ObjectStore, prefix: string): Promise<number> {
  let total = 0
  for await (const object of bucket.list(prefix)) total += object.size
  return total
}

/**
 * Removes every object under a prefix, and this node's copies of them. Keys are deleted as the
 * listing goes (an S3 listing continues after the last key it gave, so deleting those is safe).
 * Answers how many objects were removed.
 */
export async function removeUnder(storage: LocalStorage, prefix: string): Promise<number> {
  if (!storage.bucket) return 0
  let removed = 0
  const batch: Promise<void>[] = []
  for await (const { key } of storage.bucket.list(prefix)) {
    batch.push(storage.mirror.remove(key))
    removed++
    if (batch.length >= DELETES_IN_FLIGHT) await Promise.all(batch.splice(0))
  }
  await Promise.all(batch)
  return removed
}

/** Bytes of everything derived from one file: the bucket's objects, or the data folder's files. */
export function derivedBytesOf(storage: LocalStorage, fileId: number): Promise<number> {
  return storage.bucket
    ? bytesUnder(storage.bucket, derivedPrefix(fileId))
    : storage.derivedBytes(fileId)
}

/** Removes a deposited file's original and everything derived from it, on every profile. */
export async function removeStoredFile(
  storage: LocalStorage,
  storageKey: string,
  fileId: number,
): Promise<void> {
  // This node's folder first (the record on the embedded default, copies on the S3 profile).
  await storage.removeFile(storageKey, fileId)
  if (!storage.bucket) return
  await storage.mirror.remove(originalKey(storageKey))
  await removeUnder(storage, derivedPrefix(fileId))
}

/** Removes every byte a dataset's files own: its originals and their derived objects. */
export async function removeStoredDataset(
  storage: LocalStorage,
  datasetId: number,
  fileIds: number[],
): Promise<void> {
  await storage.removeDataset(datasetId, fileIds)
  if (!storage.bucket) return
  // Listed, not taken from the rows: originals of uploads that never got a row go too.
  await removeUnder(storage, `files/${datasetId}/`)
  for (const id of fileIds) await removeUnder(storage, derivedPrefix(id))
}
