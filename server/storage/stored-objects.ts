import { createReadStream } from 'node:fs'
import type { Readable } from 'node:stream'
import type { LocalStorage } from './local-storage'
import { ObjectNotFoundError } from './object-store'

/*
 * Reading and removing stored bytes by key, the same code on both profiles: on the embedded
 * default the data folder is the record and LocalStorage's own methods do the work unchanged; on
 * the S3 profile the bucket is the record, walked by listing.
 */

/** The frozen bytes of approved versions, one object per SHA-256. */
export const versionBlobKey = (sha256: string) => `version-blobs/${sha256}`

/**
 * A stored object's bytes as a stream: from the bucket on the S3 profile, from the data folder
 * otherwise. An object the bucket lacks is read from this node's folder: an original received
 * before uploads went to the bucket is still only on the node that took it.
 */
export async function openStored(storage: LocalStorage, key: string): Promise<Readable> {
  if (storage.bucket) {
    try {
      return (await storage.bucket.get(key)).stream
    } catch (err) {
      if (!(err instanceof ObjectNotFoundError)) throw err
    }
  }
  // Opened before it is handed on, so a missing file is an error here, not mid-stream.
  const stream = createReadStream(storage.mirror.pathOf(key))
  await new Promise<void>((resolve, reject) => {
    stream.once('open', () => resolve())
    stream.once('error', reject)
  })
  return stream
}

/**
 * Removes a deposited file's original and everything derived from it: this node's files, and on
 * the S3 profile the objects (LocalStorage removes the derived ones, listed, with its folder).
 */
export async function removeStoredFile(
  storage: LocalStorage,
  storageKey: string,
  fileId: number,
): Promise<void> {
  await storage.removeFile(storageKey, fileId)
  if (storage.bucket) await storage.mirror.remove(storage.originalKey(storageKey))
}

/**
 * Removes every byte a dataset's files own: its originals and their derived files. In the bucket
 * the originals are listed under `files/<dataset>/`, not taken from the rows, so an upload that
 * never got its row goes too.
 */
export async function removeStoredDataset(
  storage: LocalStorage,
  datasetId: number,
  fileIds: number[],
): Promise<void> {
  await storage.removeDataset(datasetId, fileIds)
  if (storage.bucket) await storage.mirror.removeFolder(`files/${datasetId}`)
}
