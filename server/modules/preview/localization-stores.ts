import { statSync } from 'node:fs'
import { rm } from 'node:fs/promises'
import type { FileStatus } from '@shared/domain/files'
import { ServiceUnavailableError } from '../../errors/http-error'
import type { LocalStorage } from '../../storage/local-storage'
import { ObjectNotFoundError } from '../../storage/object-store'
import { columnarStoreOf, localColumnarStoreOf } from '../files/file-job-kinds'

/**
 * A table's localization store as readers open it: its path on this node and its write time
 * here, the key of everything computed from it (descriptions, brightness scales, tiles,
 * measurements). A copy fetched anew from the bucket has a new write time, so nothing computed
 * from the previous one is used again.
 */
export interface OpenedStore {
  arrowPath: string
  mtimeMs: number
}

export interface LocalizationStoresOptions {
  /**
   * On the S3 profile, how long a copy found up to date is used before the bucket is asked again
   * (one HEAD per store and interval, whatever the number of tiles).
   */
  recheckMs?: number
  /** A monotonic clock in milliseconds (tests move it). */
  now?: () => number
}

const RECHECK_MS = 5000

interface Check {
  at: number
  settled: boolean
  fresh: Promise<boolean>
}

/**
 * Opens tables' stores for the preview and the region measurements. On the embedded profile the
 * data folder is the record: one synchronous stat, as before. On the S3 profile the store may
 * have been written on another node, or this node's folder emptied: the local copy is checked
 * against the bucket when it is missing, when the table has just become ready (the next look
 * after a "processing" one), and otherwise at most every few seconds — not per tile, which would
 * add a request to the bucket to each of the hundreds of tiles a pan asks for.
 */
export class LocalizationStores {
  private readonly checks = new Map<number, Check>()
  private readonly recheckMs: number
  private readonly now: () => number

  constructor(
    private readonly storage: LocalStorage,
    options: LocalizationStoresOptions = {},
  ) {
    this.recheckMs = options.recheckMs ?? RECHECK_MS
    this.now = options.now ?? (() => performance.now())
  }

  /** The table's store, or null while it has none to read (not read yet, or being read again). */
  async open(file: { id: number; status: FileStatus }): Promise<OpenedStore | null> {
    const arrowPath = columnarStoreOf(this.storage, file.id)
    if (!this.storage.mirror.mirrored) {
      // Synchronous: one inode lookup costs less than the thread-pool round trip of fs/promises.
      const mtimeMs =
        file.status === 'ready'
          ? statSync(arrowPath, { throwIfNoEntry: false })?.mtimeMs
          : undefined
      return mtimeMs === undefined ? null : { arrowPath, mtimeMs }
    }
    if (file.status !== 'ready') {
      // Being read (again): once it is ready, the first look asks the bucket for the new store.
      this.checks.delete(file.id)
      return null
    }
    let local = statSync(arrowPath, { throwIfNoEntry: false })
    if (!(await this.fresh(file.id, local === undefined))) return null
    local = statSync(arrowPath, { throwIfNoEntry: false })
    return local ? { arrowPath, mtimeMs: local.mtimeMs } : null
  }

  /** Whether there is a store to read, the bucket asked when the last answer is too old. */
  private fresh(fileId: number, missing: boolean): Promise<boolean> {
    const now = this.now()
    const known = this.checks.get(fileId)
    if (known && now - known.at < this.recheckMs && !(missing && known.settled)) return known.fresh
    const check: Check = { at: now, settled: false, fresh: Promise.resolve(false) }
    check.fresh = this.fetch(fileId).finally(() => {
      check.settled = true
    })
    // A failed check is not kept: the next reader asks again.
    check.fresh.catch(() => {
      if (this.checks.get(fileId) === check) this.checks.delete(fileId)
    })
    this.checks.set(fileId, check)
    return check.fresh
  }

  private async fetch(fileId: number): Promise<boolean> {
    const arrowPath = columnarStoreOf(this.storage, fileId)
    const before = statSync(arrowPath, { throwIfNoEntry: false })?.mtimeMs
    try {
      await localColumnarStoreOf(this.storage, fileId)
    } catch (error) {
      if (error instanceof ObjectNotFoundError) return false
      // The bucket cannot be reached: the copy this node has is read meanwhile.
      if (statSync(arrowPath, { throwIfNoEntry: false })) return true
      throw new ServiceUnavailableError(
        'The table’s localizations cannot be fetched from storage right now; please try again.',
      )
    }
    const after = statSync(arrowPath, { throwIfNoEntry: false })?.mtimeMs
    // Tiles this node drew from the previous copy are keyed by its write time and never shown
    // again: make room.
    if (before !== undefined && after !== before)
      void rm(this.storage.derivedLocation(fileId, 'tiles'), { recursive: true, force: true })
    return true
  }
}
