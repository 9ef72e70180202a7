import { createHash, type Hash } from 'node:crypto'
import { Readable } from 'node:stream'
import { S3Store, type MetadataValue } from '@tus/s3-store'
import type { KvStore } from '@tus/utils'
import { ERRORS, type Upload } from '@tus/server'
import { isNotFound, s3ClientConfig } from '../../storage/s3-object-store'
import { hashStream } from '../../storage/hash-stream'
import type { StorageConfig } from '../../storage/storage-config'
import { FinishedUploads } from './finished-uploads'
import type { FinishedUpload } from './upload-datastore'

type S3Config = Extract<StorageConfig, { kind: 's3' }>

/**
 * The tus S3 store (multipart uploads, one part per 8 MiB), hashing the bytes as they pass, so
 * the SHA-256 of a finished upload is known without reading the object back.
 *
 * The store keeps only whole parts when a PATCH breaks off (and a short tail as a separate
 * object between PATCHes, which a broken PATCH may lose), so what it holds afterwards can be
 * less than what passed. The running hash is therefore copied at every point where the store
 * may resume: the start of each PATCH's first part and each part boundary after it. A PATCH
 * resuming from a point with a copy continues that hash; from any other point (another node
 * took part of the upload, or a restart) the finished object is hashed once, read back.
 */
export class HashingS3Store extends S3Store {
  /** Per upload: the hash state at each offset the store may resume from. */
  private readonly states = new Map<string, Map<number, Hash>>()
  readonly finished = new FinishedUploads()
  /** Finished uploads whose hash had to be computed by reading the object back. */
  rereads = 0

  constructor(config: S3Config, options: { expiryMs: number }) {
    super({
      s3ClientConfig: { ...s3ClientConfig(config), bucket: config.bucket },
      expirationPeriodInMilliseconds: options.expiryMs,
      // Expiry is our upkeep's deleteExpired(), not bucket lifecycle rules on object tags.
      useTags: false,
      cache: NO_CACHE,
    })
    // Quota and registration need the size up front (as on the local disk).
    this.extensions = this.extensions.filter((e) => e !== 'creation-defer-length')
    prefixKeys(this.client, `${config.prefix}uploads/`)
  }

  override async write(src: Readable, id: string, offset: number): Promise<number> {
    const known = this.states.get(id)?.get(offset) ?? (offset === 0 ? createHash('sha256') : null)
    if (!known) {
      this.states.delete(id)
      return super.write(src, id, offset)
    }
    // Where this PATCH's parts begin (a stored short tail goes in front of the new bytes), and
    // how long they are: the same sums the store makes.
    const { file } = await this.getMetadata(id)
    const tail = (await this.getIncompletePartSize(id)) ?? 0
    const partSize = this.calcOptimalPartSize(file.size)
    const base = offset - tail
    const hash = known.copy()
    const states = new Map([...(this.states.get(id) ?? [])].filter(([at]) => at >= base))
    states.set(offset, known)
    this.states.set(id, states)
    let at = offset
    let nextBoundary = base + partSize
    // A generator, not a piped Transform: the store reads the body only after fetching the
    // stored tail, and a body that broke off before then must still fail its reader (a piped
    // stream destroyed before anyone listened would leave the store waiting forever).
    async function* hashing(): AsyncGenerator<Buffer> {
      for await (const chunk of src as AsyncIterable<Buffer>) {
        let from = 0
        // Cut at part boundaries, so the copy there holds exactly the bytes before it.
        while (at + (chunk.length - from) >= nextBoundary) {
          const upTo = from + (nextBoundary - at)
          hash.update(chunk.subarray(from, upTo))
          at = nextBoundary
          from = upTo
          states.set(at, hash.copy())
          nextBoundary += partSize
        }
        hash.update(chunk.subarray(from))
        at += chunk.length - from
        yield chunk
      }
    }
    const passed = Readable.from(hashing(), { objectMode: false })
    const newOffset = await super.write(passed, id, offset)
    if (at === newOffset) states.set(at, hash)
    return newOffset
  }

  /** The SHA-256 (hex) and size of a finished upload; reads the object back if it must. */
  async finish(id: string): Promise<FinishedUpload> {
    const upload = await this.getUpload(id)
    const size = upload.size ?? upload.offset
    const running = this.states.get(id)?.get(size)
    this.states.delete(id)
    if (running) return { sha256: running.digest('hex'), size }
    // An empty upload never completes its multipart upload: there is no object to read back.
    if (size === 0) return { sha256: createHash('sha256').digest('hex'), size }
    this.rereads++
    const read = await hashStream((await this.read(id)) as Readable)
    if (read.size !== size) throw ERRORS.FILE_WRITE_ERROR
    return read
  }

  override getUpload(id: string): Promise<Upload> {
    return this.finished.read(id, () => this.uploadOrUnavailable(id))
  }

  /**
   * tus's S3 store answers "not found" for any failure to read an upload's record, and a tus
   * client told 404 gives the upload up. When the bucket cannot be reached, say so (503, which
   * clients retry) and keep "not found" for a record that is really missing.
   */
  private async uploadOrUnavailable(id: string): Promise<Upload> {
    try {
      return await super.getUpload(id)
    } catch (err) {
      if (err !== ERRORS.FILE_NOT_FOUND) throw err
      const why = await this.getMetadata(id).then(
        () => null,
        (e: unknown) => e,
      )
      if (why === null) return super.getUpload(id)
      if (isNotFound(why)) throw err
      throw STORAGE_UNAVAILABLE
    }
  }

  forget(id: string): void {
    this.states.delete(id)
  }

  /**
   * The tus store's removal, for finished uploads too: it aborts the multipart upload first and
   * gives up when there is none (a finished one), leaving the object and its record behind. The
   * stored short tail (`<id>.part`) goes as well.
   */
  override async remove(id: string): Promise<void> {
    try {
      await super.remove(id)
    } catch (err) {
      if (err !== ERRORS.FILE_NOT_FOUND) throw err
      // No record either: a cancel of an unknown upload stays a 404.
      await this.getMetadata(id)
      await this.deleteObjects([id, this.infoKey(id)])
    }
    await this.deleteObjects([this.partKey(id, true)])
  }

  /** After registration (or a refusal): the record and whatever else of the upload is left. */
  async dropRecord(id: string): Promise<void> {
    this.states.delete(id)
    await this.remove(id).catch((err: unknown) => {
      if (err !== ERRORS.FILE_NOT_FOUND && !isNotFound(err)) throw err
    })
  }

  async record(id: string): Promise<Upload | undefined> {
    return (await this.getMetadata(id).catch(() => undefined))?.file
  }

  async *recordIds(): AsyncIterable<string> {
    let ContinuationToken: string | undefined
    do {
      const page = await this.client.listObjectsV2({ Bucket: this.bucket, ContinuationToken })
      for (const { Key } of page.Contents ?? [])
        if (Key?.endsWith('.info')) yield Key.slice(0, -'.info'.length)
      ContinuationToken = page.IsTruncated ? page.NextContinuationToken : undefined
    } while (ContinuationToken)
  }

  private async deleteObjects(keys: string[]): Promise<void> {
    await this.client.deleteObjects({
      Bucket: this.bucket,
      Delete: { Objects: keys.map((Key) => ({ Key })) },
    })
  }

  close(): Promise<void> {
    this.client.destroy()
    return Promise.resolve()
  }
}

const STORAGE_UNAVAILABLE = {
  status_code: 503,
  body: 'The storage is not reachable at the moment; the upload can resume when it is back.\n',
}

/**
 * Upload records are read from the bucket each time. The store's default memory cache goes stale
 * once another node (or the expiry sweep) finishes, cancels or expires an upload, and a stale
 * record makes a removed upload look complete. One small GET per request is the price.
 */
const NO_CACHE: KvStore<MetadataValue> = {
  get: () => Promise.resolve(undefined),
  set: () => Promise.resolve(),
  delete: () => Promise.resolve(),
  list: () => Promise.resolve([]),
}

const LISTINGS = ['ListMultipartUploadsCommand', 'ListObjectsV2Command']

/**
 * The tus S3 store writes at the bucket's root (its keys are the upload ids); ours live under the
 * configured prefix. Every call's keys get the prefix on the way out, and listed uploads lose it
 * on the way back.
 */
function prefixKeys(client: S3Store['client'], prefix: string) {
  if (!prefix) return
  client.middlewareStack.add(
    (next, context) => async (args) => {
      const input = { ...(args.input as Record<string, unknown>) } as {
        Key?: string
        Prefix?: string
        Delete?: { Objects?: { Key?: string }[] }
      }
      if (typeof input.Key === 'string') input.Key = prefix + input.Key
      if (input.Delete?.Objects)
        input.Delete = {
          ...input.Delete,
          Objects: input.Delete.Objects.map((o) => ({ ...o, Key: prefix + o.Key })),
        }
      const listing = LISTINGS.includes(context.commandName as string)
      if (listing) input.Prefix = prefix + (input.Prefix ?? '')
      const result = await next({ ...args, input })
      if (listing) {
        const output = result.output as {
          Uploads?: { Key?: string }[]
          Contents?: { Key?: string }[]
        }
        for (const u of [...(output.Uploads ?? []), ...(output.Contents ?? [])])
          u.Key = u.Key?.slice(prefix.length)
      }
      return result
    },
    { step: 'initialize', name: 'stippleKeyPrefix' },
  )
}
