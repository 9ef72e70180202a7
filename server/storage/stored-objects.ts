import { createReadStream } from 'node:fs'
import type { Readable } from 'node:stream'
import type { LocalStorage } from './local-storage'
import { ObjectNotFoundError } from './object-store'

/* Reading stored bytes by key, the same code on both profiles (removal is LocalStorage's). */

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
