import {
  AbortMultipartUploadCommand,
  CompleteMultipartUploadCommand,
  CopyObjectCommand,
  CreateMultipartUploadCommand,
  DeleteObjectCommand,
  GetObjectCommand,
  HeadBucketCommand,
  HeadObjectCommand,
  ListObjectsV2Command,
  PutObjectCommand,
  S3Client,
  UploadPartCommand,
  UploadPartCopyCommand,
  type S3ClientConfig,
} from '@aws-sdk/client-s3'
import { Readable } from 'node:stream'
import {
  assertKey,
  ObjectNotFoundError,
  ObjectSizeMismatchError,
  RangeNotSatisfiableError,
  rangeHeader,
  resolveRange,
  type ByteRange,
  type ListedObject,
  type ObjectInfo,
  type ObjectRead,
  type ObjectStore,
  type PutOptions,
} from './object-store'
import type { StorageConfig } from './storage-config'

type S3Config = Extract<StorageConfig, { kind: 's3' }>

/** S3 parts may be 5 MiB to 5 GiB; single PutObject and CopyObject stop at 5 GiB. */
const PART_BYTES = 8 * 1024 * 1024
const COPY_PART_BYTES = 512 * 1024 * 1024
const SINGLE_COPY_LIMIT = 5 * 1024 ** 3
/** Parts in flight at once for one object (memory: this many × PART_BYTES). */
const PARTS_IN_FLIGHT = 4

/** The SDK client for a storage configuration; the tus S3 store gets the same settings. */
export function s3ClientConfig(config: S3Config): S3ClientConfig {
  return {
    region: config.region,
    ...(config.endpoint ? { endpoint: config.endpoint } : {}),
    ...(config.credentials ? { credentials: config.credentials } : {}),
    forcePathStyle: config.forcePathStyle,
    // Checksums only where S3 demands them: the SDK's default trailing checksums use
    // aws-chunked bodies that many S3-compatible servers do not understand.
    requestChecksumCalculation: 'WHEN_REQUIRED',
    responseChecksumValidation: 'WHEN_REQUIRED',
    // A down endpoint is found out by the start-up check, not by the SDK retrying for minutes.
    maxAttempts: 3,
  }
}

function errorName(err: unknown): string {
  return (err as { name?: string }).name ?? ''
}

function httpStatus(err: unknown): number | undefined {
  return (err as { $metadata?: { httpStatusCode?: number } }).$metadata?.httpStatusCode
}

/** An S3 answer that the key (or the upload) does not exist. */
export const isNotFound = (err: unknown) =>
  ['NoSuchKey', 'NotFound'].includes(errorName(err)) || httpStatus(err) === 404

/**
 * Objects in an S3 bucket under a key prefix. Small objects go up in one PutObject; large ones as
 * a multipart upload of 8 MiB parts read from the stream (a few in flight), aborted on any fault
 * so no half object and no orphaned parts stay behind.
 */
export class S3ObjectStore implements ObjectStore {
  readonly kind = 's3'
  readonly client: S3Client
  private readonly bucket: string
  private readonly prefix: string

  constructor(config: S3Config) {
    this.client = new S3Client(s3ClientConfig(config))
    this.bucket = config.bucket
    this.prefix = config.prefix
  }

  private key(key: string): string {
    assertKey(key)
    return this.prefix + key
  }

  async put(key: string, body: Readable | Buffer, size: number, options?: PutOptions) {
    const Key = this.key(key)
    const Metadata = options?.sha256 ? { sha256: options.sha256 } : undefined
    if (size <= PART_BYTES) {
      const bytes = Buffer.isBuffer(body) ? body : await readUpTo(body, size, key)
      if (bytes.length !== size) throw new ObjectSizeMismatchError(key, size, bytes.length)
      await this.client.send(
        new PutObjectCommand({
          Bucket: this.bucket,
          Key,
          Body: bytes,
          ContentLength: size,
          Metadata,
        }),
      )
      return
    }
    const { UploadId } = await this.client.send(
      new CreateMultipartUploadCommand({ Bucket: this.bucket, Key, Metadata }),
    )
    const parts: { ETag: string; PartNumber: number }[] = []
    const inFlight = new Set<Promise<void>>()
    try {
      let received = 0
      let partNumber = 0
      const source = Buffer.isBuffer(body) ? Readable.from([body]) : body
      for await (const part of partsOf(source, PART_BYTES)) {
        received += part.length
        if (received > size) throw new ObjectSizeMismatchError(key, size, received)
        const PartNumber = ++partNumber
        const upload = this.client
          .send(
            new UploadPartCommand({
              Bucket: this.bucket,
              Key,
              UploadId,
              PartNumber,
              Body: part,
              ContentLength: part.length,
            }),
          )
          .then(({ ETag }) => void parts.push({ ETag: ETag!, PartNumber }))
        inFlight.add(upload)
        void upload.finally(() => inFlight.delete(upload)).catch(() => undefined)
        if (inFlight.size >= PARTS_IN_FLIGHT) await Promise.race(inFlight)
      }
      await Promise.all(inFlight)
      if (received !== size) throw new ObjectSizeMismatchError(key, size, received)
      parts.sort((a, b) => a.PartNumber - b.PartNumber)
      await this.client.send(
        new CompleteMultipartUploadCommand({
          Bucket: this.bucket,
          Key,
          UploadId,
          MultipartUpload: { Parts: parts },
        }),
      )
    } catch (err) {
      await Promise.allSettled(inFlight)
      await this.client
        .send(new AbortMultipartUploadCommand({ Bucket: this.bucket, Key, UploadId }))
        .catch(() => undefined)
      throw err
    }
  }

  async get(key: string, range?: ByteRange): Promise<ObjectRead> {
    // Shapes no object can satisfy are refused before asking.
    if (range) resolveRange(key, range, Number.MAX_SAFE_INTEGER)
    try {
      const res = await this.client.send(
        new GetObjectCommand({
          Bucket: this.bucket,
          Key: this.key(key),
          Range: range ? rangeHeader(range) : undefined,
        }),
      )
      const stream = res.Body as Readable
      const m = /^bytes (\d+)-(\d+)\/(\d+)$/.exec(res.ContentRange ?? '')
      if (m) return { stream, start: Number(m[1]), end: Number(m[2]), size: Number(m[3]) }
      const size = res.ContentLength ?? 0
      return { stream, start: 0, end: size - 1, size }
    } catch (err) {
      if (isNotFound(err)) throw new ObjectNotFoundError(key)
      if (errorName(err) === 'InvalidRange' || httpStatus(err) === 416) {
        const info = await this.head(key)
        if (!info) throw new ObjectNotFoundError(key)
        throw new RangeNotSatisfiableError(key, info.size)
      }
      throw err
    }
  }

  async head(key: string): Promise<ObjectInfo | null> {
    try {
      const res = await this.client.send(
        new HeadObjectCommand({ Bucket: this.bucket, Key: this.key(key) }),
      )
      return {
        size: res.ContentLength ?? 0,
        sha256: res.Metadata?.sha256 ?? null,
        lastModified: res.LastModified ?? new Date(0),
      }
    } catch (err) {
      if (isNotFound(err)) return null
      throw err
    }
  }

  async delete(key: string) {
    await this.client.send(new DeleteObjectCommand({ Bucket: this.bucket, Key: this.key(key) }))
  }

  async *list(prefix: string): AsyncIterable<ListedObject> {
    let ContinuationToken: string | undefined
    do {
      const page = await this.client.send(
        new ListObjectsV2Command({
          Bucket: this.bucket,
          Prefix: this.prefix + prefix,
          ContinuationToken,
        }),
      )
      for (const o of page.Contents ?? [])
        yield {
          key: o.Key!.slice(this.prefix.length),
          size: o.Size ?? 0,
          lastModified: o.LastModified ?? new Date(0),
        }
      ContinuationToken = page.IsTruncated ? page.NextContinuationToken : undefined
    } while (ContinuationToken)
  }

  async copy(fromKey: string, toKey: string) {
    const info = await this.head(fromKey)
    if (!info) throw new ObjectNotFoundError(fromKey)
    const CopySource = encodeURI(`${this.bucket}/${this.key(fromKey)}`)
    const Key = this.key(toKey)
    if (info.size <= SINGLE_COPY_LIMIT) {
      await this.client.send(new CopyObjectCommand({ Bucket: this.bucket, Key, CopySource }))
      return
    }
    // Beyond 5 GiB S3 copies only part by part, inside the store (no bytes pass through us).
    const Metadata = info.sha256 ? { sha256: info.sha256 } : undefined
    const { UploadId } = await this.client.send(
      new CreateMultipartUploadCommand({ Bucket: this.bucket, Key, Metadata }),
    )
    try {
      const Parts: { ETag: string; PartNumber: number }[] = []
      for (let start = 0, n = 1; start < info.size; start += COPY_PART_BYTES, n++) {
        const end = Math.min(start + COPY_PART_BYTES, info.size) - 1
        const res = await this.client.send(
          new UploadPartCopyCommand({
            Bucket: this.bucket,
            Key,
            UploadId,
            PartNumber: n,
            CopySource,
            CopySourceRange: `bytes=${start}-${end}`,
          }),
        )
        Parts.push({ ETag: res.CopyPartResult!.ETag!, PartNumber: n })
      }
      await this.client.send(
        new CompleteMultipartUploadCommand({
          Bucket: this.bucket,
          Key,
          UploadId,
          MultipartUpload: { Parts },
        }),
      )
    } catch (err) {
      await this.client
        .send(new AbortMultipartUploadCommand({ Bucket: this.bucket, Key, UploadId }))
        .catch(() => undefined)
      throw err
    }
  }

  async ping() {
    await this.client.send(new HeadBucketCommand({ Bucket: this.bucket }))
  }

  close() {
    this.client.destroy()
  }
}

/** Reads a small stream whole, failing as soon as it passes `limit` bytes. */
async function readUpTo(stream: Readable, limit: number, key: string): Promise<Buffer> {
  const chunks: Buffer[] = []
  let length = 0
  for await (const chunk of stream as AsyncIterable<Buffer>) {
    length += chunk.length
    if (length > limit) {
      stream.destroy()
      throw new ObjectSizeMismatchError(key, limit, length)
    }
    chunks.push(chunk)
  }
  return Buffer.concat(chunks, length)
}

/** The stream cut into buffers of exactly `size` bytes (the last one shorter). */
async function* partsOf(stream: Readable, size: number): AsyncGenerator<Buffer> {
  let part = Buffer.allocUnsafe(size)
  let filled = 0
  for await (const chunk of stream as AsyncIterable<Buffer>) {
    let offset = 0
    while (offset < chunk.length) {
      const n = Math.min(size - filled, chunk.length - offset)
      chunk.copy(part, filled, offset, offset + n)
      filled += n
      offset += n
      if (filled === size) {
        yield part
        part = Buffer.allocUnsafe(size)
        filled = 0
      }
    }
  }
  if (filled > 0) yield part.subarray(0, filled)
}
