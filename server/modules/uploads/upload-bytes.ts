import { createReadStream, existsSync, mkdirSync } from 'node:fs'
import { rename, rm } from 'node:fs/promises'
import { dirname } from 'node:path'
import type { Readable } from 'node:stream'
import type { FileKind } from '@shared/domain/files'
import type { LocalStorage } from '../../storage/local-storage'
import { hashObject, hashStream } from '../../storage/hash-stream'
import type { ObjectStore } from '../../storage/object-store'
import { detectFileKind, fileKindOfHead, SNIFF_BYTES } from '../files/file-kind'

/**
 * Where a finished upload's bytes are, and how they become a dataset file's original: a rename
 * on the node's disk (the embedded default), or an object copy in the bucket (the S3 profile,
 * where every node can finish and register any upload). Storage keys are `<dataset>/<upload>`.
 */
export interface UploadBytes {
  /** Whether the original is in place already (a crash came between the move and the row). */
  isMoved(storageKey: string): Promise<boolean>
  /** Moves the finished upload to its permanent place; the upload's own bytes are gone after. */
  move(uploadId: string, storageKey: string): Promise<void>
  /** Removes a finished upload's bytes (refused before the move); missing bytes are no error. */
  dropUpload(uploadId: string): Promise<void>
  /** Removes an original (refused after the move). */
  dropOriginal(storageKey: string): Promise<void>
  /** What the original is, from its first bytes. */
  kindOf(storageKey: string, name: string): Promise<{ kind: FileKind; mediaType: string }>
  /** SHA-256 and size of a moved original (for the start-up repair). */
  hashOriginal(storageKey: string): Promise<{ sha256: string; size: number }>
}

export function uploadBytesOf(storage: LocalStorage): UploadBytes {
  return storage.bucket
    ? new BucketUploadBytes(storage, storage.bucket)
    : new DiskUploadBytes(storage)
}

class DiskUploadBytes implements UploadBytes {
  constructor(private readonly storage: LocalStorage) {}

  private uploadPath(uploadId: string) {
    return `${this.storage.uploadsDir}/${uploadId}`
  }

  isMoved(storageKey: string) {
    return Promise.resolve(existsSync(this.storage.originalPath(storageKey)))
  }

  async move(uploadId: string, storageKey: string) {
    const original = this.storage.originalPath(storageKey)
    mkdirSync(dirname(original), { recursive: true })
    await rename(this.uploadPath(uploadId), original)
  }

  dropUpload(uploadId: string) {
    return rm(this.uploadPath(uploadId), { force: true })
  }

  dropOriginal(storageKey: string) {
    return rm(this.storage.originalPath(storageKey), { force: true })
  }

  kindOf(storageKey: string, name: string) {
    return detectFileKind(this.storage.originalPath(storageKey), name)
  }

  hashOriginal(storageKey: string) {
    return hashStream(createReadStream(this.storage.originalPath(storageKey), READ_OPTIONS))
  }
}

const READ_OPTIONS = { highWaterMark: 4 * 1024 * 1024 }
const uploadKey = (uploadId: string) => `uploads/${uploadId}`

/**
 * On S3 there is no rename: the finished upload object is copied inside the bucket (no byte
 * passes through the node) and then deleted. Each step can be repeated after a crash.
 */
class BucketUploadBytes implements UploadBytes {
  constructor(
    private readonly storage: LocalStorage,
    private readonly bucket: ObjectStore,
  ) {}

  private originalKey(storageKey: string) {
    return this.storage.originalKey(storageKey)
  }

  async isMoved(storageKey: string) {
    return (await this.bucket.head(this.originalKey(storageKey))) !== null
  }

  async move(uploadId: string, storageKey: string) {
    await this.bucket.copy(uploadKey(uploadId), this.originalKey(storageKey))
    await this.bucket.delete(uploadKey(uploadId))
  }

  dropUpload(uploadId: string) {
    return this.bucket.delete(uploadKey(uploadId))
  }

  dropOriginal(storageKey: string) {
    return this.bucket.delete(this.originalKey(storageKey))
  }

  /** Sniffed from the object's first bytes, in one ranged read (empty files never get here). */
  async kindOf(storageKey: string, name: string) {
    const range = { start: 0, end: SNIFF_BYTES - 1 }
    const { stream } = await this.bucket.get(this.originalKey(storageKey), range)
    return fileKindOfHead(await readAll(stream), name)
  }

  /** The SHA-256 stored with the object when there is one, else the object read back once. */
  async hashOriginal(storageKey: string) {
    const key = this.originalKey(storageKey)
    const info = await this.bucket.head(key)
    if (info?.sha256) return { sha256: info.sha256, size: info.size }
    return hashObject(this.bucket, key)
  }
}

async function readAll(stream: Readable): Promise<Buffer> {
  const chunks: Buffer[] = []
  for await (const chunk of stream as AsyncIterable<Buffer>) chunks.push(chunk)
  return Buffer.concat(chunks)
}
