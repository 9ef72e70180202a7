import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { LocalStorage } from '../../storage/local-storage'
import { DatasetFile } from './dataset-file.entity'

/**
 * Bytes a project holds against its quota: its files, everything computed from them, and the
 * uploads in progress (their full announced size, reserved at the start).
 */
export async function projectBytesUsed(em: EntityManager, projectId: number): Promise<number> {
  // Through em.execute, so that inside a transaction it reads (and waits) on the same connection.
  const [row] = await em.execute<{ total: number | null }[]>(
    `select (select coalesce(sum(f.size + f.derived_bytes), 0) from dataset_file f
               join dataset d on d.id = f.dataset_id where d.project_id = ?)
          + (select coalesce(sum(size), 0) from upload_reservation where project_id = ?) as total`,
    [projectId, projectId],
  )
  return Number(row?.total ?? 0)
}

/**
 * Start-up: files whose derived bytes were never counted (stored by an older release, or whose
 * count was lost) get them counted from the storage: the data folder, or on the S3 profile a
 * listing of the bucket under each file's derived prefix.
 */
export async function recountDerivedBytes(em: EntityManager, storage: LocalStorage) {
  const files = await em.find(DatasetFile, { derivedBytes: 0, status: 'ready' })
  for (const file of files) file.derivedBytes = await storage.derivedBytes(file.id)
  await em.flush()
  return files.filter((f) => f.derivedBytes > 0).length
}
