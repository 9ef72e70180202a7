import type { Readable } from 'node:stream'

/**
 * Bytes by key, the same on the local disk and in an S3 bucket. Keys are relative paths
 * (`files/12/abc`, `derived/7/store.arrow`): '/'-separated, no empty, '.' or '..' segments.
 */
export interface ObjectStore {
  readonly kind: 'local' | 's3'
  /** Stores exactly `size` bytes (fewer or more is an error and nothing is stored). */
  put(key: string, body: Readable | Buffer, size: number, options?: PutOptions): Promise<void>
  /** The bytes, or the range of them asked for (throws ObjectNotFound, RangeNotSatisfiable). */
  get(key: string, range?: ByteRange): Promise<ObjectRead>
  /** Size and stored SHA-256, or null when there is no such object. */
  head(key: string): Promise<ObjectInfo | null>
  /** Removes the object; removing a missing one is not an error. */
  delete(key: string): Promise<void>
  /** Every object whose key starts with the prefix (no order promised). */
  list(prefix: string): AsyncIterable<ListedObject>
  /** Copies an object (with its SHA-256) to another key. */
  copy(fromKey: string, toKey: string): Promise<void>
  /** Resolves when the store answers; rejects with the reason in words. */
  ping(): Promise<void>
  /** Frees connections (S3); nothing to do on the local disk. */
  close?(): void
}

export interface PutOptions {
  /** Kept with the object (hex), returned by head. */
  sha256?: string
}

/** Inclusive byte offsets as in HTTP Range; `suffix` asks for the last N bytes. */
export type ByteRange = { start: number; end?: number } | { suffix: number }

export interface ObjectRead {
  stream: Readable
  /** First and last byte offsets of what the stream holds (inclusive). */
  start: number
  end: number
  /** The whole object's size. */
  size: number
}

export interface ObjectInfo {
  size: number
  sha256: string | null
  lastModified: Date
}

export interface ListedObject {
  key: string
  size: number
  lastModified: Date
}

export class ObjectNotFoundError extends Error {
  constructor(readonly key: string) {
    super(`No stored object "${key}"`)
    this.name = 'ObjectNotFoundError'
  }
}

export class RangeNotSatisfiableError extends Error {
  constructor(
    readonly key: string,
    readonly size: number,
  ) {
    super(`The byte range asked for lies outside "${key}" (${size} bytes)`)
    this.name = 'RangeNotSatisfiableError'
  }
}

export class ObjectSizeMismatchError extends Error {
  constructor(
    readonly key: string,
    readonly declared: number,
    readonly received: number,
  ) {
    super(`"${key}" was declared as ${declared} bytes but ${received} arrived`)
    this.name = 'ObjectSizeMismatchError'
  }
}

export function assertKey(key: string): void {
  const segments = key.split('/')
  if (!key || segments.some((s) => s === '' || s === '.' || s === '..'))
    throw new Error(`Not a valid object key: "${key}"`)
}

/** The absolute inclusive offsets of a range in an object of `size` bytes, as HTTP defines them. */
export function resolveRange(
  key: string,
  range: ByteRange | undefined,
  size: number,
): { start: number; end: number } {
  if (!range) return { start: 0, end: size - 1 }
  if ('suffix' in range) {
    if (!(range.suffix > 0) || size === 0) throw new RangeNotSatisfiableError(key, size)
    return { start: Math.max(0, size - range.suffix), end: size - 1 }
  }
  const end = Math.min(range.end ?? size - 1, size - 1)
  if (range.start < 0 || range.start >= size || end < range.start)
    throw new RangeNotSatisfiableError(key, size)
  return { start: range.start, end }
}

/** The HTTP Range header value for a range. */
export function rangeHeader(range: ByteRange): string {
  if ('suffix' in range) return `bytes=-${range.suffix}`
  return `bytes=${range.start}-${range.end ?? ''}`
}
