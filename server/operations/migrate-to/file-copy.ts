import { hashObject } from '../../storage/hash-stream'
import type { ObjectStore } from '../../storage/object-store'

/**
 * Copies the bytes of an embedded installation (originals, derived files, frozen version blobs)
 * from the data directory to the object store through the one storage interface, checking every
 * object's SHA-256 on the way in and again by reading it back.
 */

/** What the data directory holds that the cluster profile needs; uploads in progress stay behind. */
export const COPIED_PREFIXES = ['files/', 'derived/', 'version-blobs/'] as const

/** Drawn preview tiles are a cache each node redraws on demand: not worth a request each. */
const isTileCache = (key: string) => /^derived\/[^/]+\/tiles\//.test(key)

export interface FileCopyOptions {
  /** The SHA-256 the database records for a key (originals and version blobs), if any. */
  recordedSha256: (key: string) => string | undefined
  /** Continue an interrupted copy: objects already present with the same size and SHA-256 stay. */
  resume: boolean
  /** Objects copied at once (each holds one part of at most 8 MiB in memory). */
  concurrency?: number
  progress?: (done: number, total: number, key: string) => void
}

export interface FileCopyResult {
  copied: number
  /** Already in the store from an interrupted run, same size and SHA-256. */
  alreadyThere: number
  bytes: number
  skippedTiles: number
  /** Keys whose bytes did not check out, with why: the command fails when there are any. */
  failures: { key: string; problem: string }[]
}

/** Every object key to copy, with its size, in a stable order. */
export async function objectsToCopy(
  from: ObjectStore,
): Promise<{ keys: { key: string; size: number }[]; skippedTiles: number }> {
  const keys: { key: string; size: number }[] = []
  let skippedTiles = 0
  for (const prefix of COPIED_PREFIXES)
    for await (const o of from.list(prefix)) {
      if (isTileCache(o.key)) skippedTiles++
      else keys.push({ key: o.key, size: o.size })
    }
  keys.sort((a, b) => a.key.localeCompare(b.key))
  return { keys, skippedTiles }
}

/** Whether the target holds any object under the copied prefixes (a fresh target holds none). */
export async function storeHoldsObjects(store: ObjectStore): Promise<boolean> {
  for (const prefix of COPIED_PREFIXES) for await (const _ of store.list(prefix)) return true
  return false
}

async function copyOne(
  from: ObjectStore,
  to: ObjectStore,
  key: string,
  size: number,
  options: FileCopyOptions,
): Promise<'copied' | 'already-there'> {
  // Hashed before sending (a local read): a damaged source is never copied, and the object goes
  // up with its SHA-256, so a resumed run can tell a finished object from its head alone.
  const source = await hashObject(from, key)
  const recorded = options.recordedSha256(key)
  if (recorded && source.sha256 !== recorded)
    throw new Error(
      `the data directory's bytes hash to ${source.sha256}, the database records ${recorded} (damaged in the source; not copied)`,
    )
  if (source.size !== size) throw new Error('the file changed while it was being copied')
  if (options.resume) {
    const there = await to.head(key)
    if (there && there.size === size && there.sha256 === source.sha256) return 'already-there'
  }
  const read = await from.get(key)
  await to.put(key, read.stream, size, { sha256: source.sha256 })
  const back = await hashObject(to, key)
  if (back.size !== size || back.sha256 !== source.sha256) {
    await to.delete(key)
    throw new Error(
      `read back ${back.size} bytes hashing to ${back.sha256}, sent ${size} hashing to ${source.sha256}`,
    )
  }
  return 'copied'
}

/** Copies every object, a few at a time; a failed object is reported, the rest go on. */
export async function copyObjects(
  from: ObjectStore,
  to: ObjectStore,
  options: FileCopyOptions,
): Promise<FileCopyResult> {
  const { keys, skippedTiles } = await objectsToCopy(from)
  const result: FileCopyResult = {
    copied: 0,
    alreadyThere: 0,
    bytes: 0,
    skippedTiles,
    failures: [],
  }
  let next = 0
  let done = 0
  const worker = async () => {
    while (next < keys.length) {
      const { key, size } = keys[next++]!
      try {
        const outcome = await copyOne(from, to, key, size, options)
        if (outcome === 'copied') {
          result.copied++
          result.bytes += size
        } else result.alreadyThere++
      } catch (err) {
        result.failures.push({ key, problem: (err as Error).message })
      }
      options.progress?.(++done, keys.length, key)
    }
  }
  await Promise.all(Array.from({ length: options.concurrency ?? 4 }, worker))
  return result
}
