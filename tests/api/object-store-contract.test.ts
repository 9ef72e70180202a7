import { createHash, randomBytes } from 'node:crypto'
import { mkdtemp, rm } from 'node:fs/promises'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { Readable } from 'node:stream'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { loadConfig } from '../../server/config'
import {
  ObjectNotFoundError,
  ObjectSizeMismatchError,
  RangeNotSatisfiableError,
  type ObjectStore,
} from '../../server/storage/object-store'
import { createObjectStore } from '../../server/storage/object-storage'
import { startS3, type S3Fixture } from '../fixtures/s3'

const sha256 = (bytes: Buffer) => createHash('sha256').update(bytes).digest('hex')

async function readAll(stream: Readable): Promise<Buffer> {
  const chunks: Buffer[] = []
  for await (const chunk of stream as AsyncIterable<Buffer>) chunks.push(chunk)
  return Buffer.concat(chunks)
}

/** Streams a buffer in 1 MiB pieces, as a network body would arrive. */
function streamOf(bytes: Buffer, piece = 1024 * 1024): Readable {
  return Readable.from(
    (function* () {
      for (let at = 0; at < bytes.length; at += piece) yield bytes.subarray(at, at + piece)
    })(),
  )
}

interface Profile {
  store: ObjectStore
  stop(): Promise<void>
}

// Both stores are built from the environment alone, as the server builds them.
const profiles: [string, () => Promise<Profile>][] = [
  [
    'local disk',
    async () => {
      const dataDir = await mkdtemp(join(tmpdir(), 'stipple-objects-'))
      const config = loadConfig({ DATA_DIR: dataDir })
      return {
        store: createObjectStore(config.storage, config.dataDir),
        stop: () => rm(dataDir, { recursive: true, force: true }),
      }
    },
  ],
  [
    'S3',
    async () => {
      const dataDir = await mkdtemp(join(tmpdir(), 'stipple-objects-'))
      const s3: S3Fixture = await startS3()
      const config = loadConfig({ DATA_DIR: dataDir, ...s3.env('consortium-a') })
      const store = createObjectStore(config.storage, config.dataDir)
      return {
        store,
        async stop() {
          store.close?.()
          await s3.stop()
          await rm(dataDir, { recursive: true, force: true })
        },
      }
    },
  ],
]

describe.each(profiles)('object store contract: %s', (_name, open) => {
  let profile: Profile
  let store: ObjectStore
  beforeAll(async () => {
    profile = await open()
    store = profile.store
  })
  afterAll(() => profile?.stop())

  const bytes = randomBytes(1000)

  it('gives back the bytes it was given, with their size and SHA-256', async () => {
    await store.put('files/1/round-trip', bytes, bytes.length, { sha256: sha256(bytes) })
    const read = await store.get('files/1/round-trip')
    expect(await readAll(read.stream)).toEqual(bytes)
    expect(read).toMatchObject({ start: 0, end: 999, size: 1000 })
    expect(await store.head('files/1/round-trip')).toMatchObject({
      size: 1000,
      sha256: sha256(bytes),
    })

    await store.put('files/1/from-stream', streamOf(bytes, 300), bytes.length)
    expect(await readAll((await store.get('files/1/from-stream')).stream)).toEqual(bytes)
    expect((await store.head('files/1/from-stream'))?.sha256).toBeNull()
  })

  it('reads byte ranges: first byte, middle, suffix, an end past the size', async () => {
    await store.put('files/1/ranged', bytes, bytes.length)
    const range = async (r: Parameters<ObjectStore['get']>[1]) => {
      const read = await store.get('files/1/ranged', r)
      return {
        bytes: await readAll(read.stream),
        start: read.start,
        end: read.end,
        size: read.size,
      }
    }
    expect(await range({ start: 0, end: 0 })).toEqual({
      bytes: bytes.subarray(0, 1),
      start: 0,
      end: 0,
      size: 1000,
    })
    expect((await range({ start: 100, end: 199 })).bytes).toEqual(bytes.subarray(100, 200))
    expect((await range({ start: 990 })).bytes).toEqual(bytes.subarray(990))
    expect(await range({ suffix: 10 })).toMatchObject({ bytes: bytes.subarray(990), start: 990 })
    expect(await range({ suffix: 5000 })).toMatchObject({ bytes, start: 0, end: 999 })
    expect((await range({ start: 995, end: 5000 })).bytes).toEqual(bytes.subarray(995))
  })

  it('refuses a range that starts past the end, in words and with the size', async () => {
    await store.put('files/1/short', bytes, bytes.length)
    const err = await store.get('files/1/short', { start: 1000 }).catch((e: unknown) => e)
    expect(err).toBeInstanceOf(RangeNotSatisfiableError)
    expect(err).toMatchObject({ size: 1000, key: 'files/1/short' })
    expect(String((err as Error).message)).toMatch(/outside "files\/1\/short" \(1000 bytes\)/)
    await expect(store.get('files/1/short', { suffix: 0 })).rejects.toBeInstanceOf(
      RangeNotSatisfiableError,
    )
  })

  it('says a missing key is missing', async () => {
    await expect(store.get('files/404/nothing')).rejects.toBeInstanceOf(ObjectNotFoundError)
    await expect(store.get('files/404/nothing', { start: 0, end: 0 })).rejects.toBeInstanceOf(
      ObjectNotFoundError,
    )
    expect(await store.head('files/404/nothing')).toBeNull()
    await expect(store.copy('files/404/nothing', 'files/404/copy')).rejects.toBeInstanceOf(
      ObjectNotFoundError,
    )
  })

  it('lists by prefix, keys as they were put', async () => {
    for (const key of ['derived/7/a', 'derived/7/tiles/0/0', 'derived/70/a', 'derived/8/a'])
      await store.put(key, Buffer.from(key), key.length)
    const keys = async (prefix: string) => {
      const found: string[] = []
      for await (const o of store.list(prefix)) found.push(o.key)
      return found.sort()
    }
    expect(await keys('derived/7/')).toEqual(['derived/7/a', 'derived/7/tiles/0/0'])
    expect(await keys('derived/7')).toEqual(['derived/7/a', 'derived/7/tiles/0/0', 'derived/70/a'])
    expect(await keys('derived/9/')).toEqual([])
    const [listed] = await (async () => {
      const all = []
      for await (const o of store.list('derived/8/')) all.push(o)
      return all
    })()
    expect(listed).toMatchObject({ key: 'derived/8/a', size: 'derived/8/a'.length })
  })

  it('deletes, and deleting again or deleting nothing is not an error', async () => {
    await store.put('files/2/gone', bytes, bytes.length, { sha256: sha256(bytes) })
    await store.delete('files/2/gone')
    expect(await store.head('files/2/gone')).toBeNull()
    await expect(store.delete('files/2/gone')).resolves.toBeUndefined()
    await expect(store.delete('files/2/never-was')).resolves.toBeUndefined()
    // A new object at the key does not inherit the deleted one's SHA-256.
    await store.put('files/2/gone', Buffer.from('x'), 1)
    expect(await store.head('files/2/gone')).toMatchObject({ size: 1, sha256: null })
  })

  it('copies bytes and SHA-256 to another key', async () => {
    await store.put('files/3/source', bytes, bytes.length, { sha256: sha256(bytes) })
    await store.copy('files/3/source', 'version-blobs/abc')
    expect(await readAll((await store.get('version-blobs/abc')).stream)).toEqual(bytes)
    expect((await store.head('version-blobs/abc'))?.sha256).toBe(sha256(bytes))
    expect(await store.head('files/3/source')).not.toBeNull()
  })

  it('stores nothing when fewer or more bytes arrive than declared', async () => {
    await expect(store.put('files/4/short', streamOf(bytes), 2000)).rejects.toBeInstanceOf(
      ObjectSizeMismatchError,
    )
    await expect(store.put('files/4/long', streamOf(bytes), 500)).rejects.toBeInstanceOf(
      ObjectSizeMismatchError,
    )
    expect(await store.head('files/4/short')).toBeNull()
    expect(await store.head('files/4/long')).toBeNull()
  })

  it('refuses keys that would leave the store', async () => {
    await expect(store.put('../outside', bytes, bytes.length)).rejects.toThrow(/valid object key/)
    await expect(store.head('files//x')).rejects.toThrow(/valid object key/)
  })

  it('takes a 64 MiB object by stream and gives back the same SHA-256', async () => {
    const big = randomBytes(64 * 1024 * 1024)
    const digest = sha256(big)
    await store.put('files/5/big', streamOf(big), big.length, { sha256: digest })
    expect(await store.head('files/5/big')).toMatchObject({ size: big.length, sha256: digest })
    const hash = createHash('sha256')
    for await (const chunk of (await store.get('files/5/big')).stream as AsyncIterable<Buffer>)
      hash.update(chunk)
    expect(hash.digest('hex')).toBe(digest)
    // Across the boundary of the first two 8 MiB parts.
    const seam = 8 * 1024 * 1024
    const read = await store.get('files/5/big', { start: seam - 5, end: seam + 4 })
    expect(await readAll(read.stream)).toEqual(big.subarray(seam - 5, seam + 5))
    // Over-long streams are refused for multipart objects too.
    await expect(store.put('files/5/over', streamOf(big), 20 * 1024 * 1024)).rejects.toBeInstanceOf(
      ObjectSizeMismatchError,
    )
    expect(await store.head('files/5/over')).toBeNull()
  }, 120_000)
})
