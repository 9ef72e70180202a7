import { randomBytes } from 'node:crypto'
import { createReadStream, createWriteStream } from 'node:fs'
import { copyFile, mkdir, readFile, readdir, rename, rm, stat, writeFile } from 'node:fs/promises'
import { dirname, join, relative, sep } from 'node:path'
import { Readable, Transform } from 'node:stream'
import { pipeline } from 'node:stream/promises'
import {
  assertKey,
  ObjectNotFoundError,
  ObjectSizeMismatchError,
  resolveRange,
  type ByteRange,
  type ListedObject,
  type ObjectInfo,
  type ObjectRead,
  type ObjectStore,
  type PutOptions,
} from './object-store'

/** Folders of the data directory that are not objects: write scratch and stored SHA-256s. */
const SCRATCH = '.object-scratch'
const META = '.object-meta'

/**
 * Objects as files under the data directory, a key being the path below it: the layout
 * LocalStorage uses (`files/<dataset>/<upload>`, `derived/<file>/<name>`, `version-blobs/<sha>`).
 * A stored SHA-256 lives in a side folder, so the folders the sweeps walk hold only the bytes.
 */
export class LocalObjectStore implements ObjectStore {
  readonly kind = 'local'

  constructor(private readonly root: string) {}

  private path(key: string): string {
    assertKey(key)
    return join(this.root, ...key.split('/'))
  }

  private metaPath(key: string): string {
    return join(this.root, META, ...key.split('/')) + '.json'
  }

  async put(key: string, body: Readable | Buffer, size: number, options?: PutOptions) {
    const target = this.path(key)
    // Written aside and renamed into place: a reader never sees half an object.
    const scratch = join(this.root, SCRATCH, randomBytes(12).toString('hex'))
    await mkdir(dirname(scratch), { recursive: true })
    let received = 0
    const counter = new Transform({
      transform(chunk: Buffer, _enc, done) {
        received += chunk.length
        if (received > size) done(new ObjectSizeMismatchError(key, size, received))
        else done(null, chunk)
      },
    })
    try {
      const source = Buffer.isBuffer(body) ? Readable.from([body]) : body
      await pipeline(source, counter, createWriteStream(scratch))
      if (received !== size) throw new ObjectSizeMismatchError(key, size, received)
      await mkdir(dirname(target), { recursive: true })
      await rename(scratch, target)
    } catch (err) {
      await rm(scratch, { force: true })
      throw err
    }
    await rm(this.metaPath(key), { force: true })
    if (options?.sha256) {
      await mkdir(dirname(this.metaPath(key)), { recursive: true })
      await writeFile(this.metaPath(key), JSON.stringify({ sha256: options.sha256 }))
    }
  }

  async get(key: string, range?: ByteRange): Promise<ObjectRead> {
    const info = await this.head(key)
    if (!info) throw new ObjectNotFoundError(key)
    const { start, end } = resolveRange(key, range, info.size)
    // An empty object read whole: createReadStream's `end` cannot say "nothing".
    const stream =
      info.size === 0 ? Readable.from([]) : createReadStream(this.path(key), { start, end })
    return { stream, start, end, size: info.size }
  }

  async head(key: string): Promise<ObjectInfo | null> {
    const info = await stat(this.path(key)).catch(() => null)
    if (!info?.isFile()) return null
    const meta = await readFile(this.metaPath(key), 'utf8')
      .then((text) => JSON.parse(text) as { sha256?: string })
      .catch(() => null)
    return { size: info.size, sha256: meta?.sha256 ?? null, lastModified: info.mtime }
  }

  async delete(key: string) {
    await rm(this.path(key), { force: true })
    await rm(this.metaPath(key), { force: true })
  }

  async *list(prefix: string): AsyncIterable<ListedObject> {
    // Walk only the deepest folder the prefix names whole.
    const folder = prefix.includes('/') ? prefix.slice(0, prefix.lastIndexOf('/')) : ''
    const base = folder ? this.path(folder) : this.root
    const entries = await readdir(base, { recursive: true }).catch(() => [] as string[])
    for (const entry of entries) {
      const full = join(base, entry)
      const key = relative(this.root, full).split(sep).join('/')
      if (!key.startsWith(prefix) || key.startsWith(`${SCRATCH}/`) || key.startsWith(`${META}/`))
        continue
      const info = await stat(full).catch(() => null)
      if (info?.isFile()) yield { key, size: info.size, lastModified: info.mtime }
    }
  }

  async copy(fromKey: string, toKey: string) {
    const target = this.path(toKey)
    await mkdir(dirname(target), { recursive: true })
    await copyFile(this.path(fromKey), target).catch((err: NodeJS.ErrnoException) => {
      throw err.code === 'ENOENT' ? new ObjectNotFoundError(fromKey) : err
    })
    const meta = await readFile(this.metaPath(fromKey)).catch(() => null)
    await rm(this.metaPath(toKey), { force: true })
    if (meta) {
      await mkdir(dirname(this.metaPath(toKey)), { recursive: true })
      await writeFile(this.metaPath(toKey), meta)
    }
  }

  async ping() {
    await mkdir(this.root, { recursive: true })
  }
}
