/**
 * Derived files on the S3 profile: a node opens a table's store from the bucket when it has none,
 * asks the bucket again only every few seconds (or at once when its copy went missing or the
 * table was read again), keeps serving its copy while the bucket is away, and removing a file's
 * derived part removes its objects. The embedded profile never asks a bucket.
 */
import { createHash, randomBytes } from 'node:crypto'
import { existsSync, readFileSync } from 'node:fs'
import { mkdir, mkdtemp, rm, writeFile } from 'node:fs/promises'
import { tmpdir } from 'node:os'
import { dirname, join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { loadConfig } from '@server/config'
import { LocalStorage } from '@server/storage/local-storage'
import type { ObjectStore } from '@server/storage/object-store'
import { createObjectStore } from '@server/storage/object-storage'
import { LocalizationStores } from '@server/modules/preview/localization-stores'
import {
  columnarKeysOf,
  localOriginalOf,
  publishColumnarStore,
} from '@server/modules/files/file-job-kinds'
import { startS3, type S3Fixture } from '../fixtures/s3'

let s3: S3Fixture
let bucket: ObjectStore
const calls = { head: 0, get: 0 }
let counted: ObjectStore
const folders: string[] = []
let nextFile = 1

const sha256 = (bytes: Buffer) => createHash('sha256').update(bytes).digest('hex')

async function node(withBucket = true): Promise<LocalStorage> {
  const dataDir = await mkdtemp(join(tmpdir(), 'stipple-stores-'))
  folders.push(dataDir)
  return new LocalStorage(dataDir, withBucket ? counted : null)
}

/** What an ingest leaves on the node that ran it: a store and its index, sent to the bucket. */
async function ingestOn(storage: LocalStorage, fileId: number, store: Buffer) {
  const keys = columnarKeysOf(storage, fileId)
  for (const [key, bytes] of [
    [keys.store, store],
    [
      keys.index,
      Buffer.from(JSON.stringify({ arrowFile: 'localizations.arrow', n: store.length })),
    ],
  ] as const) {
    const path = storage.mirror.pathOf(key)
    await mkdir(dirname(path), { recursive: true })
    await writeFile(path, bytes)
  }
  await publishColumnarStore(storage, fileId)
}

/** A clock the test moves. */
function manualClock() {
  let ms = 0
  return { now: () => ms, advance: (by: number) => (ms += by) }
}

beforeAll(async () => {
  s3 = await startS3()
  const config = loadConfig({ DATA_DIR: tmpdir(), ...s3.env('stores/') })
  bucket = createObjectStore(config.storage, config.dataDir)
  counted = Object.assign(Object.create(bucket) as ObjectStore, {
    head: (key: string) => {
      calls.head++
      return bucket.head(key)
    },
    get: (...args: Parameters<ObjectStore['get']>) => {
      calls.get++
      return bucket.get(...args)
    },
  })
})
afterAll(async () => {
  bucket?.close?.()
  await s3?.stop()
  for (const folder of folders) await rm(folder, { recursive: true, force: true })
})

describe('localization stores through the bucket', () => {
  it('opens on another node what one node ingested, and asks the bucket again only after the interval', async () => {
    const [a, b] = [await node(), await node()]
    const fileId = nextFile++
    const store = randomBytes(256 << 10)
    await ingestOn(a, fileId, store)
    const { store: storeKey, index: indexKey } = columnarKeysOf(a, fileId)
    expect((await bucket.head(storeKey))?.sha256).toBe(sha256(store))
    expect((await bucket.head(indexKey))?.sha256).not.toBeNull()

    const clock = manualClock()
    const stores = new LocalizationStores(b, { recheckMs: 5000, now: clock.now })
    Object.assign(calls, { head: 0, get: 0 })
    const opened = await stores.open({ id: fileId, status: 'ready' })
    expect(opened?.arrowPath).toBe(join(b.derivedDir, String(fileId), 'localizations.arrow'))
    expect(sha256(readFileSync(opened!.arrowPath))).toBe(sha256(store))
    expect(existsSync(`${opened!.arrowPath}.index.json`)).toBe(true)
    expect(calls).toEqual({ head: 2, get: 2 })

    // Tiles of a pan: no request to the bucket within the interval.
    for (let i = 0; i < 20; i++) {
      clock.advance(200)
      expect(await stores.open({ id: fileId, status: 'ready' })).toEqual(opened)
    }
    expect(calls).toEqual({ head: 2, get: 2 })
    // Past it: one HEAD per object, nothing fetched, the same copy.
    clock.advance(1001)
    expect(await stores.open({ id: fileId, status: 'ready' })).toEqual(opened)
    expect(calls).toEqual({ head: 4, get: 2 })
  })

  it('fetches again at once when the copy went missing or the table was read again', async () => {
    const [a, b] = [await node(), await node()]
    const fileId = nextFile++
    const original = randomBytes(64 << 10)
    await ingestOn(a, fileId, original)
    const clock = manualClock()
    const stores = new LocalizationStores(b, { now: clock.now })
    await stores.open({ id: fileId, status: 'ready' })

    // The node's data folder is emptied: within the interval still, the store comes back.
    await rm(b.derivedDir, { recursive: true, force: true })
    const back = await stores.open({ id: fileId, status: 'ready' })
    expect(back && sha256(readFileSync(back.arrowPath))).toBe(sha256(original))

    // Tiles drawn here from this copy, then the table is read again on A with another result.
    const tiles = b.derivedLocation(fileId, 'tiles')
    await mkdir(tiles, { recursive: true })
    await writeFile(join(tiles, '0-0-0.png'), 'png')
    const replaced = randomBytes(64 << 10)
    await ingestOn(a, fileId, replaced)
    expect(await stores.open({ id: fileId, status: 'processing' })).toBeNull()
    const fresh = (await stores.open({ id: fileId, status: 'ready' }))!
    expect(sha256(readFileSync(fresh.arrowPath))).toBe(sha256(replaced))
    expect(fresh.mtimeMs).not.toBe(back!.mtimeMs)
    await expect.poll(() => existsSync(tiles)).toBe(false)
  })

  it('answers no store for a table the bucket lacks, and serves its copy while the bucket is away', async () => {
    const [a, b] = [await node(), await node()]
    const clock = manualClock()
    const stores = new LocalizationStores(b, { now: clock.now })
    expect(await stores.open({ id: nextFile++, status: 'ready' })).toBeNull()

    const fileId = nextFile++
    const other = nextFile++
    await ingestOn(a, fileId, randomBytes(32 << 10))
    await ingestOn(a, other, randomBytes(32 << 10))
    const opened = await stores.open({ id: fileId, status: 'ready' })
    await s3.down()
    try {
      clock.advance(60_000)
      expect(await stores.open({ id: fileId, status: 'ready' })).toEqual(opened)
      await expect(stores.open({ id: other, status: 'ready' })).rejects.toMatchObject({
        status: 503,
      })
    } finally {
      await s3.up()
    }
    expect(await stores.open({ id: other, status: 'ready' })).not.toBeNull()
  })

  it('removes a derived part and a whole derived folder from the bucket too, and counts what the bucket holds', async () => {
    const [a, b] = [await node(), await node()]
    const fileId = nextFile++
    const store = randomBytes(10_000)
    await ingestOn(a, fileId, store)
    const part = a.derivedKey(fileId, 'tiles/k/0-0-0.png')
    await mkdir(dirname(a.mirror.pathOf(part)), { recursive: true })
    await writeFile(a.mirror.pathOf(part), 'tile')
    await a.mirror.publish(part)
    const indexBytes = (await bucket.head(columnarKeysOf(a, fileId).index))!.size
    expect(await b.derivedBytes(fileId)).toBe(10_000 + indexBytes + 4)

    await b.removeDerivedPart(fileId, 'tiles')
    expect(await bucket.head(part)).toBeNull()
    expect(await b.derivedBytes(fileId)).toBe(10_000 + indexBytes)

    await new LocalizationStores(b).open({ id: fileId, status: 'ready' })
    await b.removeDerived(fileId)
    const left = []
    for await (const object of bucket.list(`derived/${fileId}/`)) left.push(object.key)
    expect(left).toEqual([])
    expect(existsSync(join(b.derivedDir, String(fileId)))).toBe(false)
    expect(existsSync(join(b.mirror.dataDir, '.mirror', 'derived', String(fileId)))).toBe(false)
    expect(await b.derivedBytes(fileId)).toBe(0)
  })

  it('reads an original from the bucket for a job, or from this node when only it has it', async () => {
    const [a, b] = [await node(), await node()]
    const text = Buffer.from('frame,x,y\n1,2,3\n')
    const published = a.originalKey('4/upload-1')
    await mkdir(dirname(a.mirror.pathOf(published)), { recursive: true })
    await writeFile(a.mirror.pathOf(published), text)
    await a.mirror.publish(published)
    expect(readFileSync(await localOriginalOf(b, '4/upload-1')).equals(text)).toBe(true)

    const onlyHere = b.originalPath('4/upload-2')
    await writeFile(onlyHere, text)
    expect(await localOriginalOf(b, '4/upload-2')).toBe(onlyHere)
    await expect(localOriginalOf(b, '4/upload-3')).rejects.toThrow(/No stored object/)
  })

  it('on the embedded profile reads its own folder and asks no bucket', async () => {
    const embedded = await node(false)
    const fileId = nextFile++
    Object.assign(calls, { head: 0, get: 0 })
    await ingestOn(embedded, fileId, randomBytes(1000))
    const stores = new LocalizationStores(embedded)
    const opened = await stores.open({ id: fileId, status: 'ready' })
    expect(opened?.arrowPath).toBe(embedded.derivedLocation(fileId, 'localizations.arrow'))
    expect(await stores.open({ id: fileId, status: 'processing' })).toBeNull()
    expect(await stores.open({ id: nextFile++, status: 'ready' })).toBeNull()
    await embedded.removeDerived(fileId)
    expect(await stores.open({ id: fileId, status: 'ready' })).toBeNull()
    expect(calls).toEqual({ head: 0, get: 0 })
    expect(await bucket.head(columnarKeysOf(embedded, fileId).store)).toBeNull()
  })
})
