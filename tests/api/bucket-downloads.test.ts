/**
 * On the S3 profile (a throwaway PostgreSQL and the S3 stand-in) downloads, versions, removal and
 * the sweeps work from the bucket: the node's data folder starts empty and the originals exist
 * only as objects (put here with their records, as an upload into the bucket leaves them).
 */
import { execFileSync } from 'node:child_process'
import { createHash, randomBytes, randomUUID } from 'node:crypto'
import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import pg from 'pg'
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { EntityManager } from '@mikro-orm/better-sqlite'
import { runOncePerTick } from '@server/coordination/pg-tick-claim'
import { DatasetFile, type IDatasetFile } from '@server/modules/files/dataset-file.entity'
import { sweepStoredBytes, type SweepResult } from '@server/modules/files/orphan-sweep.service'
import { recountDerivedBytes } from '@server/modules/files/project-usage'
import type { LocalStorage } from '@server/storage/local-storage'
import type { ObjectStore } from '@server/storage/object-store'
import { openNodeStorage } from '@server/storage/object-storage'
import type { FileKind } from '@shared/domain/files'
import {
  bearer,
  buildDataset,
  buildMember,
  buildProject,
  buildUser,
  tokenFor,
} from '../fixtures/builders'
import { startS3, type S3Fixture } from '../fixtures/s3'
import { createTestApp, type TestApp } from '../fixtures/test-app'

const sha256 = (bytes: Buffer) => createHash('sha256').update(bytes).digest('hex')
const binary = (res: request.Response, cb: (err: Error | null, body: Buffer) => void) => {
  const chunks: Buffer[] = []
  res.on('data', (c: Buffer) => chunks.push(c))
  res.on('end', () => cb(null, Buffer.concat(chunks)))
}

let s3: S3Fixture
let t: TestApp
/** The test's own view of the shared bucket (a second node's storage, with its own folder). */
let node2: LocalStorage
let bucket: ObjectStore
let projectId: number
let depositor: { id: number; token: string }
let stewardToken: string
const scratch = mkdtempSync(join(tmpdir(), 'stipple-bucket-downloads-'))

beforeAll(async () => {
  s3 = await startS3('bucket-downloads')
  t = await createTestApp({ ...s3.env('stipple/') }, { database: 'postgresql' })
  node2 = openNodeStorage({ storage: t.config.storage, dataDir: join(scratch, 'node-2') })
  bucket = node2.bucket!
  const em = t.em()
  const member = await buildMember(em)
  depositor = { id: member.id, token: await tokenFor(em, member) }
  projectId = (await buildProject(em, [{ user: member, role: 'member' }])).id
  stewardToken = await tokenFor(em, await buildUser(em, { siteRole: 'steward' }))
}, 120_000)

afterAll(async () => {
  bucket?.close?.()
  await t?.close()
  await s3?.stop()
  rmSync(scratch, { recursive: true, force: true })
})

const as = (token: string) => ({
  get: (path: string) => request(t.app).get(path).set(bearer(token)).buffer(true).parse(binary),
  post: (path: string, body: object = {}) =>
    request(t.app).post(path).set(bearer(token)).send(body),
  delete: (path: string) => request(t.app).delete(path).set(bearer(token)),
})

/** An original as an upload into the bucket leaves it: the object, then its file row. */
async function deposit(
  em: EntityManager,
  datasetId: number,
  name: string,
  bytes: Buffer,
  kind: FileKind = 'other',
): Promise<IDatasetFile> {
  const storageKey = `${datasetId}/${randomUUID().replace(/-/g, '')}`
  await bucket.put(`files/${storageKey}`, bytes, bytes.length, { sha256: sha256(bytes) })
  const file = em.create(DatasetFile, {
    dataset: datasetId,
    name,
    size: bytes.length,
    sha256: sha256(bytes),
    kind,
    status: 'ready',
    storageKey,
  })
  await em.flush()
  return file
}

const keysUnder = async (prefix: string) => {
  const keys: string[] = []
  for await (const o of bucket.list(prefix)) keys.push(o.key)
  return keys.sort()
}

/** Every regular file in a folder, recursively. */
const filesIn = (dir: string) =>
  readdirSync(dir, { recursive: true, withFileTypes: true })
    .filter((e) => e.isFile())
    .map((e) => join(e.parentPath, e.name))

describe('downloads from the bucket', () => {
  it("zips a dataset whose bytes are only in the bucket, with the manifest and each member's SHA-256", async () => {
    const em = t.em()
    const dataset = await buildDataset(em, projectId, { createdBy: depositor.id })
    // One member above the single-PUT size, so the bucket holds it in parts.
    const contents = new Map([
      ['cells 01.csv', Buffer.from('frame,x,y\n1,2,3\n'.repeat(2000))],
      ['stack.tif', randomBytes(9 * 1024 * 1024 + 17)],
      ['notes é.txt', Buffer.from('notes\n')],
    ])
    for (const [name, bytes] of contents) await deposit(em, dataset.id, name, bytes)

    const res = await as(depositor.token).get(`/api/datasets/${dataset.accession}/archive.zip`)
    expect(res.status).toBe(200)
    expect(res.headers['content-type']).toBe('application/zip')
    const zipPath = join(scratch, 'archive.zip')
    writeFileSync(zipPath, res.body as Buffer)
    // Python's zipfile checks each member's CRC and reads it; SHA-256s computed there.
    const listed = JSON.parse(
      execFileSync(
        'python3',
        [
          '-c',
          [
            'import hashlib, json, sys, zipfile',
            'z = zipfile.ZipFile(sys.argv[1])',
            'assert z.testzip() is None',
            'print(json.dumps({i.filename: hashlib.sha256(z.read(i)).hexdigest() for i in z.infolist()}))',
          ].join('\n'),
          zipPath,
        ],
        { encoding: 'utf8' },
      ),
    ) as Record<string, string>
    const prefix = `${dataset.accession}/`
    const expected = Object.fromEntries(
      [...contents].map(([name, bytes]) => [`${prefix}${name}`, sha256(bytes)]),
    )
    const { [`${prefix}manifest-sha256.txt`]: manifestSha, ...members } = listed
    expect(members).toEqual(expected)
    const manifest = [...contents.keys()]
      .sort()
      .map((name) => `${sha256(contents.get(name)!)}  ${name}\n`)
      .join('')
    expect(manifestSha).toBe(sha256(Buffer.from(manifest)))
    // The node served it without keeping any of the bytes.
    const kept = filesIn(t.config.dataDir).map((path) => sha256(readFileSync(path)))
    for (const bytes of contents.values()) expect(kept).not.toContain(sha256(bytes))
  })

  it("serves a raw stack's thumbnail and frame means from the bucket", async () => {
    const em = t.em()
    const dataset = await buildDataset(em, projectId, { createdBy: depositor.id })
    const stack = await deposit(em, dataset.id, 'cells.ome.tif', randomBytes(4096), 'raw_stack')
    const png = Buffer.concat([Buffer.from('89504e470d0a1a0a', 'hex'), randomBytes(300)])
    const trace = Buffer.from(JSON.stringify({ means: [101.5, 99.25, 100] }))
    await bucket.put(`derived/${stack.id}/projection.png`, png, png.length)
    await bucket.put(`derived/${stack.id}/frame-means.json`, trace, trace.length)

    const base = `/api/datasets/${dataset.accession}/files/${stack.id}`
    const thumbnail = await as(depositor.token).get(`${base}/thumbnail.png`)
    expect(thumbnail.status).toBe(200)
    expect(thumbnail.headers['content-type']).toBe('image/png')
    expect(thumbnail.body).toEqual(png)
    const means = await as(depositor.token).get(`${base}/frame-means.json`)
    expect(means.status).toBe(200)
    expect(means.headers['content-type']).toMatch(/^application\/json/)
    expect(JSON.parse((means.body as Buffer).toString())).toEqual({ means: [101.5, 99.25, 100] })
    expect(filesIn(t.config.dataDir).map((p) => sha256(readFileSync(p)))).not.toContain(sha256(png))
  })
})

describe('versions in the bucket', () => {
  it('freezes each SHA-256 once as an object copy and serves the version from it after the original is removed', async () => {
    const em = t.em()
    const dataset = await buildDataset(em, projectId, { createdBy: depositor.id })
    const table = Buffer.from('frame,x [nm],y [nm]\n' + '3,140.5,902.25\n'.repeat(500))
    const same = await deposit(em, dataset.id, 'cells.csv', table)
    await deposit(em, dataset.id, 'cells (again).csv', table)
    const other = Buffer.from('other bytes\n'.repeat(100))
    await deposit(em, dataset.id, 'other.txt', other)

    const id = dataset.id
    expect((await as(depositor.token).post(`/api/datasets/${id}/submit`)).status).toBe(200)
    const approved = await as(stewardToken).post(`/api/datasets/${id}/review`, {
      decision: 'approve',
      checklist: { completeness: true, quality: true, licence: true, ethics: true, embargo: true },
    })
    expect(approved.status, JSON.stringify(approved.body)).toBe(200)

    // One blob per SHA-256, stored with it.
    const blobs = await keysUnder('version-blobs/')
    expect(blobs).toEqual(expect.arrayContaining([`version-blobs/${sha256(table)}`]))
    expect(blobs).toContain(`version-blobs/${sha256(other)}`)
    expect(blobs.filter((k) => k.endsWith(sha256(table)))).toHaveLength(1)
    expect((await bucket.head(`version-blobs/${sha256(table)}`))?.sha256).toBe(sha256(table))

    // The next version's draft drops the file: its original leaves the bucket, v1 keeps it.
    expect((await as(depositor.token).post(`/api/datasets/${id}/versions`)).status).toBe(201)
    const removed = await as(depositor.token).delete(`/api/datasets/${id}/files/${same.id}`)
    expect(removed.status).toBe(204)
    expect(await bucket.head(`files/${same.storageKey}`)).toBeNull()

    const v1 = await request(t.app)
      .get(`/api/datasets/${id}/versions/1`)
      .set(bearer(depositor.token))
    const frozen = (v1.body as { files: { id: number; name: string; sha256: string }[] }).files
    expect(frozen.map((f) => f.name).sort()).toEqual([
      'cells (again).csv',
      'cells.csv',
      'other.txt',
    ])
    for (const f of frozen) {
      const res = await as(depositor.token).get(
        `/api/datasets/${id}/versions/1/files/${f.id}/content`,
      )
      expect(res.status).toBe(200)
      expect(sha256(res.body as Buffer)).toBe(f.sha256)
      expect(res.headers['content-digest']).toBe(
        `sha-256=:${Buffer.from(f.sha256, 'hex').toString('base64')}:`,
      )
    }
    const f = frozen.find((x) => x.name === 'cells.csv')!
    const part = await as(depositor.token)
      .get(`/api/datasets/${id}/versions/1/files/${f.id}/content`)
      .set('Range', 'bytes=20-49')
    expect(part.status).toBe(206)
    expect(part.body).toEqual(table.subarray(20, 50))
    expect(filesIn(t.config.dataDir).map((p) => sha256(readFileSync(p)))).not.toContain(
      sha256(table),
    )
  })
})

describe('removal, the sweep and the recount by listing the bucket', () => {
  it('leaves no object under a removed dataset’s keys', async () => {
    const em = t.em()
    const dataset = await buildDataset(em, projectId, { createdBy: depositor.id })
    const files = [
      await deposit(em, dataset.id, 'a.csv', Buffer.from('a\n'.repeat(50))),
      await deposit(em, dataset.id, 'b.tif', randomBytes(2048)),
    ]
    for (const f of files)
      for (const name of ['localizations.arrow', 'tiles/3/1/2.png', 'tiles/3/1/3.png'])
        await bucket.put(`derived/${f.id}/${name}`, Buffer.from(name), name.length)
    // An upload that never got its row is under the dataset's prefix too.
    await bucket.put(`files/${dataset.id}/unregistered`, Buffer.from('x'), 1)
    const neighbour = await buildDataset(em, projectId, { createdBy: depositor.id })
    const kept = await deposit(em, neighbour.id, 'kept.csv', Buffer.from('kept\n'))

    const res = await as(depositor.token).delete(`/api/datasets/${dataset.id}`)
    expect(res.status).toBe(204)
    expect(await keysUnder(`files/${dataset.id}/`)).toEqual([])
    for (const f of files) expect(await keysUnder(`derived/${f.id}/`)).toEqual([])
    expect(await keysUnder(`files/${neighbour.id}/`)).toEqual([`files/${kept.storageKey}`])
  })

  it('sweeps once per tick across two nodes: old orphans go, young ones and owned ones stay', async () => {
    const em = t.em()
    const dataset = await buildDataset(em, projectId, { createdBy: depositor.id })
    const owned = await deposit(em, dataset.id, 'owned.csv', Buffer.from('owned\n'))
    const put = (key: string) => bucket.put(key, Buffer.from(key), key.length)
    const uploadId = 'f0e1d2c3b4a5968778695a4b3c2d1e0f'
    await put(`files/${dataset.id}/orphan-old`)
    await put(`derived/999001/localizations.arrow`)
    // A registration in progress: the upload's record is still there.
    await put(`uploads/${uploadId}.info`)
    await put(`files/${dataset.id}/${uploadId}`)
    // A derived prefix with one old object and one young one counts as young.
    await put(`derived/999003/localizations.arrow`)
    await new Promise((r) => setTimeout(r, 2100))
    await put(`derived/999003/tiles/0/0/0.png`)
    await put(`files/${dataset.id}/orphan-young`)
    await put(`derived/999002/localizations.arrow`)
    const young = (await bucket.head(`files/${dataset.id}/orphan-young`))!.lastModified
    const graceMs = 10 * 60_000
    // A second before the young ones come of age; the old ones are two seconds older.
    const now = new Date(young.getTime() + graceMs - 1000)

    const pools = [0, 1].map(
      () => new pg.Pool({ connectionString: String(t.orm.config.get('clientUrl')), max: 1 }),
    )
    const node1 = openNodeStorage({ storage: t.config.storage, dataDir: t.config.dataDir })
    let bucketSweeps = 0
    try {
      const results = await Promise.all(
        [node1, node2].map((storage, i) =>
          sweepStoredBytes(t.em(), storage, {
            now,
            graceMs,
            oncePerTick: (at, work) =>
              runOncePerTick(pools[i]!, 'orphan-sweep', at, () => {
                bucketSweeps++
                return work()
              }),
          }),
        ),
      )
      expect(bucketSweeps).toBe(1)
      const total = results.reduce(
        (sum: SweepResult, r) => ({
          originals: sum.originals + r.originals,
          derived: sum.derived + r.derived,
          uploads: sum.uploads + r.uploads,
        }),
        { originals: 0, derived: 0, uploads: 0 },
      )
      expect(total).toMatchObject({ originals: 1, derived: 1 })
    } finally {
      node1.bucket?.close?.()
      await Promise.all(pools.map((p) => p.end()))
    }
    expect(await keysUnder(`files/${dataset.id}/`)).toEqual(
      [
        `files/${owned.storageKey}`,
        `files/${dataset.id}/${uploadId}`,
        `files/${dataset.id}/orphan-young`,
      ].sort(),
    )
    expect(await keysUnder('derived/999001/')).toEqual([])
    expect(await keysUnder('derived/999002/')).toHaveLength(1)
    expect(await keysUnder('derived/999003/')).toHaveLength(2)
  }, 30_000)

  it("recounts a file's derived bytes from the bucket's listing", async () => {
    const em = t.em()
    const dataset = await buildDataset(em, projectId, { createdBy: depositor.id })
    const counted = await deposit(em, dataset.id, 'counted.csv', Buffer.from('1,2\n'))
    const bare = await deposit(em, dataset.id, 'bare.csv', Buffer.from('3,4\n'))
    const derived = {
      'localizations.arrow': 70_001,
      'localizations.arrow.index.json': 513,
      'tiles/2/0/1.png': 4_096,
    }
    for (const [name, size] of Object.entries(derived))
      await bucket.put(`derived/${counted.id}/${name}`, randomBytes(size), size)

    await recountDerivedBytes(t.em(), node2)
    const [after, untouched] = await Promise.all(
      [counted.id, bare.id].map((id) => t.em().findOneOrFail(DatasetFile, { id })),
    )
    expect(after!.derivedBytes).toBe(70_001 + 513 + 4_096)
    expect(untouched!.derivedBytes).toBe(0)
  })
})
