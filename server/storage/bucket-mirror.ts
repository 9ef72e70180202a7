import { createReadStream, createWriteStream } from 'node:fs'
import { mkdir, readFile, rename, rm, stat, writeFile } from 'node:fs/promises'
import { dirname, join, relative, sep } from 'node:path'
import { pipeline } from 'node:stream/promises'
import { hashStream } from './hash-stream'
import {
  ObjectNotFoundError,
  type ObjectInfo,
  type ObjectStore,
  type PutOptions,
} from './object-store'

/** Large reads for hashing a file just written (from the page cache). */
const READ_OPTIONS = { highWaterMark: 4 * 1024 * 1024 }
/** Deletes in flight at once while removing a folder's objects (S3 deletes one key a request here). */
const DELETES_IN_FLIGHT = 16

/**
 * What a node's copy was made from. S3 keeps write times to the second: an object replaced
 * within the same second by one of the same size is told apart by its SHA-256, when it was
 * stored with one (publish it with `sha256` where that matters).
 */
interface CopyRecord {
  size: number
  lastModified: string
  sha256: string | null
}

/**
 * The data folder as this node's copy of the bucket, on the S3 profile. Engines read and write
 * files (an Arrow store is read at offsets all over, a TIFF by its directory), so a node works on
 * local copies: `localCopy` fetches an object the first time it is needed here, and again when
 * another node has replaced it; `publish` sends a file written here to the bucket, where every
 * node finds it. The bucket is the record; a node's folder may be emptied at any time.
 *
 * Keys are the paths below the data folder ('/'-separated), the layout both object stores use.
 * On the embedded profile there is no bucket: the folder is the record, and both calls only
 * answer the path.
 */
export class BucketMirror {
  private readonly fetching = new Map<string, Promise<string>>()

  constructor(
    readonly dataDir: string,
    private readonly bucket: ObjectStore | null,
  ) {}

  get mirrored(): boolean {
    return this.bucket !== null
  }

  pathOf(key: string): string {
    return join(this.dataDir, ...key.split('/'))
  }

  keyOf(path: string): string {
    const key = relative(this.dataDir, path).split(sep).join('/')
    if (!key || key.startsWith('../')) throw new Error(`"${path}" is not in the data folder`)
    return key
  }

  /**
   * The path of an up-to-date local copy of the object: fetched when this node has none, or when
   * the object changed since (size or write time). One fetch per key at a time.
   */
  async localCopy(key: string): Promise<string> {
    const path = this.pathOf(key)
    if (!this.bucket) return path
    const running = this.fetching.get(key)
    if (running) return running
    const fetch = this.refresh(key, path, this.bucket).finally(() => this.fetching.delete(key))
    this.fetching.set(key, fetch)
    return fetch
  }

  /** Sends the file written here under `key` to the bucket, for every node. */
  async publish(key: string, options: PutOptions = {}): Promise<void> {
    if (!this.bucket) return
    const path = this.pathOf(key)
    const { size } = await stat(path)
    await this.bucket.put(key, createReadStream(path), size, options)
    const info = await this.bucket.head(key)
    // This node's file is the object: no fetch back.
    if (info) await this.remember(key, info)
  }

  /**
   * `publish` with the file's SHA-256 kept beside the object, so other nodes tell a replacement
   * apart even within the second S3 dates it to. The file is read once more for the hash (just
   * written, so from the page cache); nothing is read on the embedded profile.
   */
  async publishWithDigest(key: string): Promise<void> {
    if (!this.bucket) return
    const { sha256 } = await hashStream(createReadStream(this.pathOf(key), READ_OPTIONS))
    await this.publish(key, { sha256 })
  }

  /** Removes the object and this node's copy. */
  async remove(key: string): Promise<void> {
    if (this.bucket) {
      await this.bucket.delete(key)
      await rm(this.recordPath(key), { force: true })
    }
    await rm(this.pathOf(key), { force: true })
  }

  /**
   * Removes a folder's worth of keys (`derived/7`, `files/12`): every object below it in the bucket
   * (listed, then deleted a few at a time: a dataset's originals may be hundreds), this node's
   * files and the records of its copies. Other nodes' copies are found stale when they next ask.
   */
  async removeFolder(folderKey: string): Promise<void> {
    if (this.bucket) {
      const bucket = this.bucket
      const keys: string[] = []
      for await (const object of bucket.list(`${folderKey}/`)) keys.push(object.key)
      for (let i = 0; i < keys.length; i += DELETES_IN_FLIGHT)
        await Promise.all(keys.slice(i, i + DELETES_IN_FLIGHT).map((key) => bucket.delete(key)))
      await rm(join(this.dataDir, '.mirror', ...folderKey.split('/')), {
        recursive: true,
        force: true,
      })
    }
    await rm(this.pathOf(folderKey), { recursive: true, force: true })
  }

  /** Bytes of the bucket's objects below a folder (the S3 profile's record of what it holds). */
  async storedBytes(folderKey: string): Promise<number> {
    if (!this.bucket) throw new Error('storedBytes reads the bucket; there is none here')
    let total = 0
    for await (const object of this.bucket.list(`${folderKey}/`)) total += object.size
    return total
  }

  private async refresh(key: string, path: string, bucket: ObjectStore): Promise<string> {
    const info = await bucket.head(key)
    if (!info) throw new ObjectNotFoundError(key)
    const [record, local] = await Promise.all([this.recorded(key), stat(path).catch(() => null)])
    if (local?.size === info.size && record && sameObject(record, info)) return path
    await mkdir(dirname(path), { recursive: true })
    // Written beside and renamed over: a reader on this node never sees half an object.
    const partial = `${path}.${process.pid}-${Math.random().toString(36).slice(2)}.fetching`
    try {
      const { stream } = await bucket.get(key)
      await pipeline(stream, createWriteStream(partial))
      const fetched = await stat(partial)
      if (fetched.size !== info.size)
        throw new Error(`"${key}" arrived with ${fetched.size} of its ${info.size} bytes`)
      await rename(partial, path)
    } catch (error) {
      await rm(partial, { force: true })
      throw error
    }
    await this.remember(key, info)
    return path
  }

  private recordPath(key: string): string {
    return join(this.dataDir, '.mirror', ...key.split('/')) + '.json'
  }

  private async recorded(key: string): Promise<CopyRecord | null> {
    try {
      return JSON.parse(await readFile(this.recordPath(key), 'utf8')) as CopyRecord
    } catch {
      return null
    }
  }

  private async remember(key: string, info: ObjectInfo): Promise<void> {
    const record: CopyRecord = {
      size: info.size,
      lastModified: info.lastModified.toISOString(),
      sha256: info.sha256,
    }
    const path = this.recordPath(key)
    await mkdir(dirname(path), { recursive: true })
    await writeFile(path, JSON.stringify(record))
  }
}

const sameObject = (record: CopyRecord, info: ObjectInfo) =>
  record.size === info.size &&
  record.lastModified === info.lastModified.toISOString() &&
  record.sha256 === info.sha256
