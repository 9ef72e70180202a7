import type { DataStore, Upload } from '@tus/server'
import type { StorageConfig } from '../../storage/storage-config'
import type { FinishedUploads } from './finished-uploads'
import { HashingFileStore } from './hashing-file-store'
import { HashingS3Store } from './hashing-s3-store'

export interface FinishedUpload {
  sha256: string
  size: number
}

/**
 * What the upload routes need of a tus store beyond tus's own interface: the SHA-256 of a
 * finished upload, computed while its bytes passed (read back only when that state is gone),
 * and the upload kept answerable from memory while its finishing request is answered.
 */
export interface HashingUploadStore extends DataStore {
  finish(id: string): Promise<FinishedUpload>
  readonly finished: FinishedUploads
  /** Drops the running hash of an upload that is cancelled or discarded. */
  forget(id: string): void
  /**
   * Drops a finished upload's tus record once it was registered or refused (the bytes are moved
   * or removed by then). On S3 whatever else of the upload is left in the bucket goes with it.
   */
  dropRecord(id: string): Promise<void>
  /** Ids of uploads with a record (finished or not), for the start-up repair. */
  recordIds(): AsyncIterable<string>
  /** An upload's record alone (its bytes may have been moved already), or undefined. */
  record(id: string): Promise<Upload | undefined>
  close(): Promise<void>
}

/** The tus store for the configured storage: files under DATA_DIR/uploads, or the S3 bucket. */
export function createUploadDatastore(options: {
  storage: StorageConfig
  uploadsDir: string
  expiryMs: number
}): HashingUploadStore {
  const { storage, uploadsDir, expiryMs } = options
  if (storage.kind === 's3') return new HashingS3Store(storage, { expiryMs })
  return new HashingFileStore({ directory: uploadsDir, expirationPeriodInMilliseconds: expiryMs })
}
