/**
 * Derived files on the cluster profile: two real app nodes (separate processes and data
 * folders, one PostgreSQL database, one bucket). A table deposited into the bucket is read and
 * reported on by whichever node takes its jobs; the other node, whose folder holds nothing of it,
 * draws the same tiles and measures the same region; a node whose derived folder is emptied
 * carries on from the bucket. A raw stack uploaded to one node is scanned on either, and its
 * thumbnail and frame means are the same from both.
 */
import { execFile } from 'node:child_process'
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { promisify } from 'node:util'
import type { EntityManager } from '@mikro-orm/better-sqlite'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { loadConfig } from '@server/config'
import { openDatabase, type Orm } from '@server/db'
import { seedDemoTables } from '@server/seeders/demo-tables'
import { openNodeStorage } from '@server/storage/object-storage'
import type { AppNode } from '../fixtures/app-node'
import { apiOf, startNodeCluster, waitFor, type NodeCluster } from '../fixtures/node-cluster'
import { writeTiffStack } from '../fixtures/tiff-writer'
import { tusUpload } from '../fixtures/tus-upload'

const run = promisify(execFile)
/** The demo's 3D table, which comes with two regions drawn by its owner and a collaborator. */
const DATASET = 'Bassoon 3D astigmatic STORM, cortical slices'
const TABLE = 'bassoon_3d_locs.csv'
const OWNER = 'lena.ortolan@vesperridge.example'

let cluster: NodeCluster
let seedDir: string
let orm: Orm | null = null
let token: string
let table: { fileId: number; datasetId: number; accession: string; storageKey: string }

/** The nodes' shared settings (database, bucket) without a node's own folder and port. */
const sharedEnv = (node: AppNode) => {
  const { DATA_DIR: _dir, ...env } = node.env
  return env
}

const get = (node: AppNode, path: string) =>
  fetch(`${node.url}${path}`, { headers: { authorization: `Bearer ${token}` } })

async function bytesOf(node: AppNode, path: string): Promise<Buffer> {
  const res = await get(node, path)
  expect(res.status, `${node.name} ${path}: ${res.status}`).toBe(200)
  return Buffer.from(await res.arrayBuffer())
}

async function jsonOf(node: AppNode, path: string): Promise<Record<string, unknown>> {
  const res = await get(node, path)
  expect(res.status, `${node.name} ${path}: ${await res.clone().text()}`).toBe(200)
  return (await res.json()) as Record<string, unknown>
}

/** What a node's data folder holds of the table: its original, derived files, records of copies. */
function heldBy(node: AppNode): string[] {
  const places = [
    join('files', table.storageKey),
    join('derived', String(table.fileId)),
    join('.mirror', 'files', table.storageKey + '.json'),
    join('.mirror', 'derived', String(table.fileId)),
  ]
  return places.filter((p) => existsSync(join(node.dataDir, p)))
}

beforeAll(async () => {
  cluster = await startNodeCluster()
  const env = sharedEnv(cluster.a)
  // Deposited into the bucket by the demo seeder, as the demo's first start does on this profile;
  // from a third folder, so neither node has the original until its jobs fetch it.
  seedDir = mkdtempSync(join(tmpdir(), 'stipple-seeder-'))
  const config = loadConfig({ ...env, DATA_DIR: seedDir })
  orm = await openDatabase({ driver: 'postgresql', url: env.DATABASE_URL! })
  const storage = openNodeStorage(config)
  expect(storage.mirror.mirrored).toBe(true)
  const em = orm.em.fork() as unknown as EntityManager
  expect(await seedDemoTables(em, storage, () => {}, [DATASET])).toBe(1)
  storage.bucket?.close?.()
  rmSync(join(seedDir, 'files'), { recursive: true, force: true })

  const { stdout } = await run(
    process.execPath,
    ['--import', 'tsx', 'server/cli/admin.ts', 'token', 'create', OWNER],
    { env: { ...process.env, ...env, DATA_DIR: cluster.a.dataDir } },
  )
  token = stdout.trim().split('\n').at(-1)!
  const { rows } = await cluster.db.query<{
    fileId: number
    datasetId: number
    accession: string
    storageKey: string
  }>(
    `select f.id as "fileId", d.id as "datasetId", d.accession, f.storage_key as "storageKey"
       from dataset_file f join dataset d on d.id = f.dataset_id where f.name = $1`,
    [TABLE],
  )
  table = rows[0]!
}, 240_000)

afterAll(async () => {
  await orm?.close()
  await cluster?.stop()
  if (seedDir) rmSync(seedDir, { recursive: true, force: true })
})

describe('derived files on two app nodes and one bucket', () => {
  const base = () => `/api/datasets/${table.accession}/files/${table.fileId}`

  it('reads, converts and reports on a table deposited into the bucket, on either node', async () => {
    const quality = await waitFor(
      'the table to be read and its quality report computed',
      async () => {
        const report = await jsonOf(cluster.a, `${base()}/quality`)
        if (report.status === 'failed') throw new Error(`quality failed: ${String(report.error)}`)
        return report.status === 'done' ? report : undefined
      },
      240_000,
    )
    expect(quality.localizations).toBeGreaterThan(10_000)
    const { rows } = await cluster.db.query<{ status: string; derived_bytes: string }>(
      `select status, derived_bytes from dataset_file where id = $1`,
      [table.fileId],
    )
    expect(rows[0]!.status).toBe('ready')
    // Counted from the bucket: the store and its index, whichever node wrote them.
    expect(Number(rows[0]!.derived_bytes)).toBeGreaterThan(100_000)
  }, 260_000)

  it('gives the same tiles, quality summary and region measurement on a node that had nothing of the table', async () => {
    const { a, b } = cluster
    // Whichever node ran the jobs, B now starts from an empty folder as far as this table goes.
    for (const place of heldBy(b)) rmSync(join(b.dataDir, place), { recursive: true, force: true })
    expect(heldBy(b)).toEqual([])

    const tiles = ['/tiles/0/0/0.png', '/tiles/1/1/0.png', '/tiles/2/1/2.png?colormap=grayscale']
    const fromA = await Promise.all(tiles.map((t) => bytesOf(a, `${base()}${t}`)))
    const fromB = await Promise.all(tiles.map((t) => bytesOf(b, `${base()}${t}`)))
    for (const [i, png] of fromA.entries()) {
      expect(png.subarray(1, 4).toString()).toBe('PNG')
      expect(png.equals(fromB[i]!), tiles[i]).toBe(true)
    }
    // B fetched the store and its index; the original stays in the bucket.
    expect(heldBy(b)).toContain(join('derived', String(table.fileId)))
    expect(heldBy(b)).not.toContain(join('files', table.storageKey))

    expect(await jsonOf(b, `${base()}/preview`)).toEqual(await jsonOf(a, `${base()}/preview`))
    const summaries = await Promise.all(
      [a, b].map((node) => jsonOf(node, `/api/datasets/${table.accession}/quality`)),
    )
    expect(summaries[1]).toEqual(summaries[0])

    const regions = (await jsonOf(a, `${base()}/regions`)).items as { id: number }[]
    expect(regions.length).toBeGreaterThan(0)
    const measure = `/api/regions/${regions[0]!.id}/measurements?kind=summary`
    const [onA, onB] = await Promise.all([a, b].map((node) => jsonOf(node, measure)))
    const { computeMs: _a, cached: _ca, ...measuredA } = onA!
    const { computeMs: _b, cached: _cb, ...measuredB } = onB!
    expect(measuredA.count).toBeGreaterThan(0)
    expect(measuredB).toEqual(measuredA)
  })

  it('carries on when a node’s derived folder is emptied', async () => {
    const { a } = cluster
    const derived = join(a.dataDir, 'derived')
    const before = await bytesOf(a, `${base()}/tiles/1/0/1.png`)
    const measured = (await jsonOf(a, `${base()}/regions`)).items as { id: number }[]
    const measure = `/api/regions/${measured[0]!.id}/measurements?kind=summary`
    const { computeMs: _m, cached: _c, ...first } = await jsonOf(a, measure)

    for (const entry of readdirSync(derived))
      rmSync(join(derived, entry), { recursive: true, force: true })
    expect(readdirSync(derived)).toEqual([])

    expect((await bytesOf(a, `${base()}/tiles/1/0/1.png`)).equals(before)).toBe(true)
    const again = await jsonOf(a, measure)
    // Measured anew from the fetched copy (the cache is keyed by the copy's write time).
    expect(again.cached).toBe(false)
    const { computeMs: _n, cached: _d, ...second } = again
    expect(second).toEqual(first)
    expect(existsSync(join(derived, String(table.fileId), 'localizations.arrow'))).toBe(true)
  })

  it('scans a raw stack uploaded to one node, its thumbnail and frame means the same from both', async () => {
    const { a, b, accession, depositorToken } = cluster
    const path = join(seedDir, 'stack.tif')
    // Frame f has every pixel at 100 + f: its mean is 100 + f.
    writeTiffStack(path, {
      width: 32,
      height: 24,
      frames: 12,
      pixels: (f) => new Array(32 * 24).fill(100 + f),
    })
    const sent = await tusUpload(`${a.url}/api/uploads`, depositorToken, readFileSync(path), {
      dataset: accession,
      filename: 'stack.tif',
    })
    expect(sent.fileId, `upload: ${sent.status} ${sent.body}`).not.toBeNull()
    const api = apiOf(depositorToken)
    const filePath = `/api/datasets/${accession}/files/${sent.fileId}`
    const file = await waitFor(
      'the stack to be scanned',
      async () => {
        const list = (await (await api(a, `/api/datasets/${accession}/files`)).json()) as {
          items: { id: number; status: string; kind: string }[]
        }
        const f = list.items.find((item) => item.id === Number(sent.fileId))
        return f && (f.status === 'ready' || f.status === 'rejected') ? f : undefined
      },
      120_000,
    )
    expect(file).toMatchObject({ kind: 'raw_stack', status: 'ready' })
    // Neither node keeps the scan's outputs: both answer from the bucket.
    for (const node of [a, b])
      rmSync(join(node.dataDir, 'derived', String(sent.fileId)), { recursive: true, force: true })
    const [fromA, fromB] = await Promise.all(
      [a, b].map(async (node) => {
        const thumbnail = await api(node, `${filePath}/thumbnail.png`)
        const trace = await api(node, `${filePath}/frame-means.json`)
        expect([thumbnail.status, trace.status]).toEqual([200, 200])
        return {
          thumbnail: Buffer.from(await thumbnail.arrayBuffer()),
          trace: (await trace.json()) as number[],
        }
      }),
    )
    expect(fromA!.trace).toEqual(Array.from({ length: 12 }, (_, f) => 100 + f))
    expect(fromB!.trace).toEqual(fromA!.trace)
    expect(fromA!.thumbnail.subarray(1, 4).toString()).toBe('PNG')
    expect(fromB!.thumbnail.equals(fromA!.thumbnail)).toBe(true)
  }, 150_000)
})
