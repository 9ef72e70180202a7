import { mkdirSync } from 'node:fs'
import { readdir, rm, stat } from 'node:fs/promises'
import { join } from 'node:path'
import { BucketMirror } from './bucket-mirror'
import type { ObjectStore } from './object-store'

/**
 * Where bytes live on this node: all under DATA_DIR. Everything else asks this module for paths.
 * On the S3 profile `bucket` is the record and DATA_DIR this node's copy of it: readers ask
 * `mirror.localCopy(key)` before opening a stored file, writers `mirror.publish(key)` after
 * writing one (both only answer the path on the embedded default, where `bucket` is null).
 */
export class LocalStorage {
  /** This node's copy of the bucket (a pass-through on the embedded default). */
  readonly mirror: BucketMirror
  readonly uploadsDir: string
  readonly filesDir: string
  readonly derivedDir: string
  /** Bytes of approved versions, one per SHA-256, shared by every version holding them. */
  readonly versionBlobsDir: string

  constructor(
    dataDir: string,
    /** The bucket every node shares (S3 profile), or null when DATA_DIR is the record. */
    readonly bucket: ObjectStore | null = null,
  ) {
    this.mirror = new BucketMirror(dataDir, bucket)
    this.uploadsDir = join(dataDir, 'uploads')
    this.filesDir = join(dataDir, 'files')
    this.derivedDir = join(dataDir, 'derived')
    this.versionBlobsDir = join(dataDir, 'version-blobs')
    for (const dir of [this.uploadsDir, this.filesDir, this.derivedDir, this.versionBlobsDir])
      mkdirSync(dir, { recursive: true })
  }

  /** Where the frozen bytes with this SHA-256 live (the orphan sweep never walks this folder). */
  versionBlobPath(sha256: string): string {
    return join(this.versionBlobsDir, sha256)
  }

  /** The untouched original of a deposited file. Keys never change once written. */
  originalPath(storageKey: string): string {
    return join(this.filesDir, storageKey)
  }

  /**
   * Where a file computed from a deposited one is, without creating its folder: for readers, and
   * for writers that create the folder when a write finds it missing (tiles, on hot paths).
   */
  derivedLocation(fileId: number, name: string): string {
    return join(this.derivedDir, String(fileId), name)
  }

  /** Files computed from a deposited file (columnar store, thumbnails), one folder per file. */
  derivedPath(fileId: number, name: string): string {
    const dir = join(this.derivedDir, String(fileId))
    mkdirSync(dir, { recursive: true })
    return join(dir, name)
  }

  /** Removes a deposited file's original and everything derived from it. */
  async removeFile(storageKey: string, fileId: number): Promise<void> {
    await this.removeOriginal(storageKey)
    await this.removeDerived(fileId)
  }

  /** Removes an original: this node's file, and on the S3 profile its object. */
  removeOriginal(storageKey: string): Promise<void> {
    return this.mirror.remove(this.originalKey(storageKey))
  }

  /** The key of a deposited file's original (`files/<dataset>/<upload id>`). */
  originalKey(storageKey: string): string {
    return `files/${storageKey}`
  }

  /** The key of a file computed from a deposited one (`derived/<file id>/<name>`). */
  derivedKey(fileId: number, name: string): string {
    return `derived/${fileId}/${name}`
  }

  /**
   * Removes one part of a file's derived folder (e.g. its cached preview tiles), with its objects
   * in the bucket on the S3 profile.
   */
  removeDerivedPart(fileId: number, part: string): Promise<void> {
    return this.mirror.removeFolder(this.derivedKey(fileId, part))
  }

  /** Removes everything derived from a file, with its objects in the bucket on the S3 profile. */
  removeDerived(fileId: number): Promise<void> {
    return this.mirror.removeFolder(`derived/${fileId}`)
  }

  /**
   * Removes every byte a dataset's files own: its originals' folder and their derived folders. In
   * the bucket the originals are listed under `files/<dataset>/`, not taken from the rows, so an
   * upload that never got its row goes too.
   */
  async removeDataset(datasetId: number, fileIds: number[]): Promise<void> {
    await this.mirror.removeFolder(`files/${datasetId}`)
    for (const id of fileIds) await this.removeDerived(id)
  }

  /** Keys of stored originals (`<dataset>/<upload id>`) with their age, for the orphan sweep. */
  async *storedOriginals(): AsyncGenerator<{ key: string; ageMs: number }> {
    for (const dataset of await readdir(this.filesDir)) {
      const dir = join(this.filesDir, dataset)
      for (const name of await readdir(dir).catch(() => [])) {
        const info = await stat(join(dir, name)).catch(() => null)
        if (info) yield { key: `${dataset}/${name}`, ageMs: Date.now() - info.mtimeMs }
      }
    }
  }

  /** File ids that have a derived folder, with its age. */
  async *derivedFolders(): AsyncGenerator<{ fileId: number; ageMs: number }> {
    for (const name of await readdir(this.derivedDir)) {
      const info = await stat(join(this.derivedDir, name)).catch(() => null)
      if (info && /^\d+$/.test(name))
        yield { fileId: Number(name), ageMs: Date.now() - info.mtimeMs }
    }
  }

  /**
   * Bytes of everything derived from one file (columnar store, index, thumbnails, tiles). On the
   * S3 profile what the bucket holds for it: tiles are drawn per node and not counted there.
   */
  async derivedBytes(fileId: number): Promise<number> {
    if (this.bucket) return this.mirror.storedBytes(`derived/${fileId}`)
    const dir = join(this.derivedDir, String(fileId))
    let total = 0
    for (const entry of await readdir(dir, { recursive: true }).catch(() => [])) {
      const info = await stat(join(dir, String(entry))).catch(() => null)
      if (info?.isFile()) total += info.size
    }
    return total
  }

  /** Unfinished tus uploads: their id, whether tus still has their record, and their age. */
  async *uploadEntries(): AsyncGenerator<{ id: string; hasRecord: boolean; ageMs: number }> {
    const names = new Set(await readdir(this.uploadsDir))
    for (const name of names) {
      if (name.endsWith('.json')) continue
      const info = await stat(join(this.uploadsDir, name)).catch(() => null)
      if (info?.isFile())
        yield { id: name, hasRecord: names.has(`${name}.json`), ageMs: Date.now() - info.mtimeMs }
    }
  }

  /** Removes an unfinished upload's bytes and its tus record. */
  async removeUpload(id: string): Promise<void> {
    await rm(join(this.uploadsDir, id), { force: true })
    await rm(join(this.uploadsDir, `${id}.json`), { force: true })
  }
}
