import { existsSync } from 'node:fs'
import { copyFile, link } from 'node:fs/promises'
import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { LocalStorage } from '../../storage/local-storage'
import { VersionBlob, type IVersionBlob } from './dataset-version.entity'

/**
 * The blob for these bytes: the one already stored under this checksum, or a new one made by
 * hard-linking the deposited original (no second copy on disk; a later removal of the original
 * by the draft leaves the blob intact). The bytes are linked before any row is written. A copy is made only where a link is impossible
 * (another file system).
 */
export async function blobFor(
  em: EntityManager,
  storage: LocalStorage,
  file: { sha256: string; size: number; storageKey: string },
  now: Date,
): Promise<IVersionBlob> {
  const target = storage.versionBlobPath(file.sha256)
  const original = storage.originalPath(file.storageKey)
  if (!existsSync(target) && existsSync(original)) {
    await link(original, target).catch((err: NodeJS.ErrnoException) => {
      if (err.code === 'EEXIST') return
      if (err.code === 'EXDEV' || err.code === 'EPERM') return copyFile(original, target)
      throw err
    })
  }
  return (
    (await em.findOne(VersionBlob, { sha256: file.sha256 })) ??
    em.create(VersionBlob, { sha256: file.sha256, size: file.size, createdAt: now })
  )
}
