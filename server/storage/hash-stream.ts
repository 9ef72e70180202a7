import { createHash } from 'node:crypto'
import type { Readable } from 'node:stream'
import type { ObjectStore } from './object-store'

/** SHA-256 and length of everything a stream gives. */
export async function hashStream(stream: Readable): Promise<{ sha256: string; size: number }> {
  const hash = createHash('sha256')
  let size = 0
  for await (const chunk of stream as AsyncIterable<Buffer>) {
    hash.update(chunk)
    size += chunk.length
  }
  return { sha256: hash.digest('hex'), size }
}

/** The SHA-256 and size of an object, read whole. */
export async function hashObject(
  store: ObjectStore,
  key: string,
): Promise<{ sha256: string; size: number }> {
  return hashStream((await store.get(key)).stream)
}
