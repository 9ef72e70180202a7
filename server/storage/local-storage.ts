import { mkdirSync } from 'node:fs'
import { join } from 'node:path'

/**
 * Where bytes live on the embedded default: all under DATA_DIR. Everything else asks this module
 * for paths, so an object-storage backend (the tus S3 store and a matching layout of keys) can
 * replace it without touching the rest.
 */
export class LocalStorage {
  readonly uploadsDir: string
  readonly filesDir: string
  readonly derivedDir: string

  constructor(dataDir: string) {
    this.uploadsDir = join(dataDir, 'uploads')
    this.filesDir = join(dataDir, 'files')
    this.derivedDir = join(dataDir, 'derived')
    for (const dir of [this.uploadsDir, this.filesDir, this.derivedDir])
      mkdirSync(dir, { recursive: true })
  }

  /** The untouched original of a deposited file. Keys never change once written. */
  originalPath(storageKey: string): string {
    return join(this.filesDir, storageKey)
  }

  /** Files computed from a deposited file (columnar store, thumbnails), one folder per file. */
  derivedPath(fileId: number, name: string): string {
    const dir = join(this.derivedDir, String(fileId))
    mkdirSync(dir, { recursive: true })
    return join(dir, name)
  }
}
