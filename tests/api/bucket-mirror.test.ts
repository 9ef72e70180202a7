/**
 * On the S3 profile each node works on local copies of the bucket's objects: a file published on
 * one node is fetched by another when it needs it, fetched again only when it changed, never seen
 * half-written, and the embedded profile reads its own folder without any of it.
 */
import { createHash, randomBytes } from 'node:crypto'
import { existsSync, readdirSync, readFileSync } from 'node:fs'
import { mkdir, mkdtemp, rm, writeFile } from 'node:fs/promises'
import { tmpdir } from 'node:os'
import { dirname, join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { loadConfig } from '../../server/config'
import { BucketMirror } from '../../server/storage/bucket-mirror'
import { ObjectNotFoundError, type ObjectStore } from '../../server/storage/object-store'
import { createObjectStore } from '../../server/storage/object-storage'
import { startS3, type S3Fixture } from '../fixtures/s3'

const sha256 = (bytes: Buffer) => createHash('sha256').update(bytes).digest('hex')

let s3: S3Fixture
let bucket: ObjectStore
let gets = 0
const folders: string[] = []

async function node(): Promise<BucketMirror> {
  const dataDir = await mkdtemp(join(tmpdir(), 'stipple-mirror-'))
  folders.push(dataDir)
  return new BucketMirror(dataDir, counted)
}

/** The real S3 store, counting the objects read from it. */
let counted: ObjectStore

async function write(mirror: BucketMirror, key: string, bytes: Buffer) {
  const path = mirror.pathOf(key)
  await mkdir(dirname(path), { recursive: true })
  await writeFile(path, bytes)
}

beforeAll(async () => {
  s3 = await startS3()
  const config = loadConfig({ DATA_DIR: tmpdir(), ...s3.env('mirror') })
  bucket = createObjectStore(config.storage, config.dataDir)
  counted = Object.assign(Object.create(bucket) as ObjectStore, {
    get: (...args: Parameters<ObjectStore['get']>) => {
      gets++
      return bucket.get(...args)
    },
  })
})
afterAll(async () => {
  bucket?.close?.()
  await s3?.stop()
  for (const folder of folders) await rm(folder, { recursive: true, force: true })
})

describe('the bucket mirror', () => {
  it('lets a node read what another published, and fetches it again only when it changed', async () => {
    const [a, b] = [await node(), await node()]
    const key = 'derived/7/localizations.arrow'
    const first = randomBytes(3 << 20)
    await write(a, key, first)
    await a.publish(key, { sha256: sha256(first) })

    gets = 0
    const path = await b.localCopy(key)
    expect(path).toBe(join(b.dataDir, 'derived', '7', 'localizations.arrow'))
    expect(sha256(readFileSync(path))).toBe(sha256(first))
    await b.localCopy(key)
    expect(gets).toBe(1)
    // The publishing node has the object already: it fetches nothing.
    await a.localCopy(key)
    expect(gets).toBe(1)

    // Replaced on A by an object of the same size. S3 gives write times to the second, so B's
    // record of its copy is set to the new object's time, as if both were written in one second:
    // only the SHA-256 tells them apart.
    const second = randomBytes(3 << 20)
    await write(a, key, second)
    await a.publish(key, { sha256: sha256(second) })
    const record = join(b.dataDir, '.mirror', 'derived', '7', 'localizations.arrow.json')
    const { lastModified } = (await counted.head(key))!
    const copied = JSON.parse(readFileSync(record, 'utf8')) as Record<string, unknown>
    await writeFile(record, JSON.stringify({ ...copied, lastModified: lastModified.toISOString() }))
    expect(sha256(readFileSync(await b.localCopy(key)))).toBe(sha256(second))
    expect(gets).toBe(2)
  })

  it('fetches an object once for callers asking at the same time', async () => {
    const [a, b] = [await node(), await node()]
    const bytes = randomBytes(1 << 20)
    await write(a, 'files/3/upload-1', bytes)
    await a.publish('files/3/upload-1')
    gets = 0
    const paths = await Promise.all([1, 2, 3].map(() => b.localCopy('files/3/upload-1')))
    expect(new Set(paths).size).toBe(1)
    expect(gets).toBe(1)
  })

  it('says which object is missing, and leaves nothing half-fetched when the bucket goes away', async () => {
    const [a, b] = [await node(), await node()]
    await expect(b.localCopy('files/9/none')).rejects.toBeInstanceOf(ObjectNotFoundError)
    await write(a, 'files/9/big', randomBytes(8 << 20))
    await a.publish('files/9/big')
    await s3.down()
    try {
      await expect(b.localCopy('files/9/big')).rejects.toThrow()
    } finally {
      await s3.up()
    }
    const folder = join(b.dataDir, 'files', '9')
    expect(existsSync(folder) ? readdirSync(folder) : []).toEqual([])
    expect(readFileSync(await b.localCopy('files/9/big')).length).toBe(8 << 20)
  })

  it('removes the object and the local copy', async () => {
    const [a, b] = [await node(), await node()]
    await write(a, 'derived/5/thumbnail.png', Buffer.from('png'))
    await a.publish('derived/5/thumbnail.png')
    await b.localCopy('derived/5/thumbnail.png')
    await b.remove('derived/5/thumbnail.png')
    expect(existsSync(b.pathOf('derived/5/thumbnail.png'))).toBe(false)
    expect(await counted.head('derived/5/thumbnail.png')).toBeNull()
  })

  it('on the embedded profile answers paths in its own folder and sends nothing', async () => {
    const dataDir = await mkdtemp(join(tmpdir(), 'stipple-mirror-'))
    folders.push(dataDir)
    const embedded = new BucketMirror(dataDir, null)
    expect(embedded.mirrored).toBe(false)
    await write(embedded, 'files/1/a', Buffer.from('a'))
    await embedded.publish('files/1/a')
    expect(await counted.head('files/1/a')).toBeNull()
    expect(await embedded.localCopy('files/1/a')).toBe(join(dataDir, 'files', '1', 'a'))
    expect(embedded.keyOf(join(dataDir, 'derived', '4', 'x'))).toBe('derived/4/x')
    expect(() => embedded.keyOf('/etc/passwd')).toThrow(/not in the data folder/)
  })
})
