import { createReadStream, existsSync } from 'node:fs'
import { copyFile, link } from 'node:fs/promises'
import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { LocalStorage } from '../../storage/local-storage'
import { ObjectNotFoundError, type ObjectStore } from '../../storage/object-store'
import { versionBlobKey } from '../../storage/stored-objects'
import { VersionBlob, type IVersionBlob } from './dataset-version.entity'

interface FrozenFile {
  sha256: string
  size: number
  storageKey: string
}

/**
 * The blob for these bytes: the one already stored under this checksum, or a new one made from
 * the deposited original, so a later removal of the original by the draft leaves the blob
 * intact. The bytes are stored before any row is written. On the local disk the blob is a hard
 * link of the original (no second copy; a copy only where a link is impossible, across file
 * systems); in a bucket it is an object copied by the store (no bytes pass through the node).
 */
export async function blobFor(
  em: EntityManager,
  storage: LocalStorage,
  file: FrozenFile,
  now: Date,
): Promise<IVersionBlob> {
  if (storage.bucket) await copyIntoBucket(storage, storage.bucket, file)
  else await linkOnDisk(storage, file)
  return (
    (await em.findOne(VersionBlob, { sha256: file.sha256 })) ??
    em.create(VersionBlob, { sha256: file.sha256, size: file.size, createdAt: now })
  )
}

async function linkOnDisk(storage: LocalStorage, file: FrozenFile): Promise<void> {
  const target = storage.versionBlobPath(file.sha256)
  const original = storage.originalPath(file.storageKey)
  if (!existsSync(target) && existsSync(original)) {
    await link(original, target).catch((err: NodeJS.ErrnoException) => {
      if (err.code === 'EEXIST') return
      if (err.code === 'EXDEV' || err.code === 'EPERM') return copyFile(original, target)
      throw err
    })
  }
}

/**
 * One object per SHA-256, as the hard link is one inode: made once, by a server-side copy of the
 * original. Two nodes freezing the same bytes at once both copy the same bytes to the same key.
 */
async function copyIntoBucket(
  storage: LocalStorage,
  bucket: ObjectStore,
  file: FrozenFile,
): Promise<void> {
  const target = versionBlobKey(file.sha256)
  if (await bucket.head(target)) return
  try {
    await bucket.copy(storage.originalKey(file.storageKey), target)
  } catch (err) {
    if (!(err instanceof ObjectNotFoundError)) throw err
    // An original uploaded before uploads were written to the bucket is only on the node that
    // took it: its bytes go up from there.
    const original = storage.originalPath(file.storageKey)
    if (!existsSync(original)) return
    await bucket.put(target, createReadStream(original), file.size, { sha256: file.sha256 })
  }
}
