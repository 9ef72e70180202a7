/**
 * `npm run admin -- migrate-to`: a real embedded installation (the demo consortium, plus a table
 * uploaded and ingested by the running server) is moved to a throwaway PostgreSQL and an S3
 * stand-in, then a Stipple started on that cluster profile is asked for the same things.
 */
import { execFile } from 'node:child_process'
import { createHash } from 'node:crypto'
import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { promisify } from 'node:util'
import { Client } from 'pg'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { S3ObjectStore } from '@server/storage/s3-object-store'
import { parseStorageConfig } from '@server/storage/storage-config'
import { startPostgres, type PostgresServer } from '../fixtures/postgres'
import { startS3, type S3Fixture } from '../fixtures/s3'
import { freePort, ServerProcess } from '../fixtures/server-process'

const run = promisify(execFile)
const DEPOSITOR = 'kasimir.feld@harrowgate.example'
const DATASET = 'STPL-000005'

let dir: string
let sourceDir: string
let pg: PostgresServer
let s3: S3Fixture
let databaseUrl: string
let token: string
let table: Buffer
let before: { datasets: unknown; publicDatasets: unknown; file: StoredFile }

interface StoredFile {
  id: number
  name: string
  status: string
  sha256: string | null
  storageKey?: string
}

const sha256 = (bytes: Buffer) => createHash('sha256').update(bytes).digest('hex')

/**
 * Every byte of the embedded database and of the stored files, to show the copy never wrote to
 * them. Opening a WAL database read-only makes SQLite create an empty write-ahead log and its
 * shared-memory index (-shm, an index of the log, not data): an absent log and an empty one are
 * the same database.
 */
const sourceFingerprint = () =>
  readdirSync(sourceDir, { recursive: true, withFileTypes: true })
    .filter((e) => e.isFile() && !e.name.endsWith('-shm'))
    .map((e) => join(e.parentPath, e.name))
    .filter((path) => readFileSync(path).length > 0 || !path.endsWith('-wal'))
    .sort()
    .map((path) => `${path}:${sha256(readFileSync(path))}`)
    .join('\n')

const admin = (args: string[], env: Record<string, string> = {}) =>
  run(process.execPath, ['--import', 'tsx', 'server/cli/admin.ts', ...args], {
    env: { ...process.env, DATA_DIR: sourceDir, LOG_LEVEL: 'silent', ...env },
    maxBuffer: 16 * 1024 * 1024,
  })

/** The S3_* settings without STORAGE_URL: the target bucket is the command's flag. */
const s3Settings = () => {
  const { STORAGE_URL: _url, ...rest } = s3.env()
  return rest
}
const migrateTo = (...extra: string[]) =>
  admin(
    ['migrate-to', '--database', databaseUrl, '--storage', `s3://${s3.bucket}/`, ...extra],
    s3Settings(),
  )

async function api(server: ServerProcess, path: string, auth = true) {
  const res = await fetch(`${server.url}${path}`, {
    headers: auth ? { authorization: `Bearer ${token}` } : {},
  })
  expect(res.status, `${path}: ${await res.clone().text()}`).toBe(200)
  return res.json() as Promise<Record<string, unknown>>
}

const fileNamed = async (server: ServerProcess, name: string) =>
  ((await api(server, `/api/datasets/${DATASET}/files`)).items as StoredFile[]).find(
    (f) => f.name === name,
  )

/** What a person sees of the catalogue: their list, and the public one. */
async function catalogue(server: ServerProcess) {
  const ids = (body: Record<string, unknown>) =>
    (body.items as { accession: string; title: string; state: string }[]).map(
      (d) => `${d.accession} ${d.state} ${d.title}`,
    )
  return {
    datasets: ids(await api(server, '/api/datasets?limit=100')),
    publicDatasets: ids(await api(server, '/api/datasets?limit=100', false)),
  }
}

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'stipple-migrate-to-'))
  sourceDir = join(dir, 'embedded')
  const embedded = new ServerProcess(await freePort(), {
    DATA_DIR: sourceDir,
    DEMO: 'true',
    DEMO_TABLES: 'false',
  })
  ;[pg, s3] = await Promise.all([startPostgres(), startS3('stipple-moved')])
  databaseUrl = await pg.createDatabase()
  await embedded.start()
  try {
    token = (await admin(['token', 'create', DEPOSITOR])).stdout.trim().split('\n').at(-1)!
    // A small localization table, deposited through the real upload path and ingested.
    const rows = ['frame,x [nm],y [nm],photons']
    for (let i = 0; i < 3000; i++)
      rows.push(`${1 + (i % 300)},${(i * 7919) % 20000},${(i * 104729) % 20000},${500 + (i % 900)}`)
    table = Buffer.from(rows.join('\n') + '\n')
    const path = join(dir, 'moved-locs.csv')
    writeFileSync(path, table)
    await run(
      process.execPath,
      [
        'server/cli/stipple-upload.mjs',
        '--server',
        embedded.url,
        '--dataset',
        DATASET,
        '--quiet',
        path,
      ],
      { env: { ...process.env, STIPPLE_TOKEN: token } },
    )
    let file: StoredFile | undefined
    for (const end = Date.now() + 90_000; Date.now() < end;) {
      file = await fileNamed(embedded, 'moved-locs.csv')
      if (file && file.status !== 'processing') break
      await new Promise((r) => setTimeout(r, 250))
    }
    expect(file).toMatchObject({ status: 'ready', sha256: sha256(table) })
    before = { ...(await catalogue(embedded)), file: file! }
  } finally {
    await embedded.stop()
  }
}, 240_000)

afterAll(async () => {
  await Promise.all([pg?.stop(), s3?.stop()])
  rmSync(dir, { recursive: true, force: true })
})

describe('npm run admin -- migrate-to', () => {
  let target: ServerProcess

  afterAll(async () => {
    await target?.stop()
  })

  it('copies every record and file, verified, and leaves the source as it was', async () => {
    const fingerprint = sourceFingerprint()
    const { stdout } = await migrateTo()
    expect(sourceFingerprint()).toBe(fingerprint)

    // The summary: a line per table with equal counts, the files copied and checked.
    for (const table of ['dataset', 'dataset_file', 'user', 'audit_event', 'api_token'])
      expect(stdout).toMatch(new RegExp(`^  ${table} +(\\d+) → +\\1  ok$`, 'm'))
    expect(stdout).toMatch(/copied and verified +[1-9]\d* \(/)
    expect(stdout).not.toContain('FAILED')

    // The uploaded original is in the bucket with the bytes that were uploaded, and so is what
    // the ingest derived from it.
    const config = parseStorageConfig({
      ...s3.env(),
      S3_FORCE_PATH_STYLE: true,
      S3_REGION: 'us-east-1',
    }).config!
    const store = new S3ObjectStore(config as Extract<typeof config, { kind: 's3' }>)
    try {
      const keys: string[] = []
      for await (const o of store.list('')) keys.push(o.key)
      const original = keys.find((k) => k.startsWith('files/') && k.includes('/'))
      expect(original).toBeDefined()
      const originals = keys.filter((k) => k.startsWith('files/'))
      const hashes = await Promise.all(
        originals.map(async (key) => {
          const { stream } = await store.get(key)
          const chunks: Buffer[] = []
          for await (const chunk of stream) chunks.push(chunk as Buffer)
          return sha256(Buffer.concat(chunks))
        }),
      )
      expect(hashes).toContain(sha256(table))
      expect(keys.some((k) => k.startsWith(`derived/${before.file.id}/`))).toBe(true)
    } finally {
      store.close()
    }
  }, 120_000)

  it('refuses to copy into a target that holds data, and finishes with --resume', async () => {
    const refused = await migrateTo().catch((err: { code: number; stderr: string }) => err)
    expect(refused).toMatchObject({ code: 1 })
    expect((refused as { stderr: string }).stderr).toMatch(/already holds data.*--resume/)

    const { stdout } = await migrateTo('--resume')
    expect(stdout).toContain('Records: already copied')
    expect(stdout).toMatch(/copied and verified +0 /)
    expect(stdout).toMatch(/already there +[1-9]/)
  }, 120_000)

  it('gives a Stipple on the cluster profile the same catalogue, files (served from the bucket) and sign-ins', async () => {
    target = new ServerProcess(await freePort(), {
      DATA_DIR: join(dir, 'cluster-node'),
      DATABASE_URL: databaseUrl,
      DEMO: 'false',
      ...s3.env(),
    })
    await target.start()
    // The token made on the embedded installation works: tokens, users and shares came along.
    expect(await catalogue(target)).toEqual({
      datasets: before.datasets,
      publicDatasets: before.publicDatasets,
    })
    const file = await fileNamed(target, 'moved-locs.csv')
    expect(file).toMatchObject({ id: before.file.id, status: 'ready', sha256: sha256(table) })
    // Its bytes come from the bucket, whole and by range.
    const content = `${target.url}/api/datasets/${DATASET}/files/${file!.id}/content`
    const whole = await fetch(content, { headers: { authorization: `Bearer ${token}` } })
    expect(whole.status).toBe(200)
    expect(sha256(Buffer.from(await whole.arrayBuffer()))).toBe(sha256(table))
    expect(whole.headers.get('content-digest')).toBe(
      `sha-256=:${Buffer.from(sha256(table), 'hex').toString('base64')}:`,
    )
    const part = await fetch(content, {
      headers: { authorization: `Bearer ${token}`, range: 'bytes=100-199' },
    })
    expect(part.status).toBe(206)
    expect(part.headers.get('content-range')).toBe(`bytes 100-199/${table.length}`)
    expect(Buffer.from(await part.arrayBuffer())).toEqual(table.subarray(100, 200))
    const beyond = await fetch(content, {
      headers: { authorization: `Bearer ${token}`, range: `bytes=${table.length + 5}-` },
    })
    expect(beyond.status).toBe(416)
    expect(beyond.headers.get('content-range')).toBe(`bytes */${table.length}`)
    // New records get ids after the copied ones: the id sequences were moved past them.
    const db = new Client({ connectionString: databaseUrl })
    await db.connect()
    try {
      for (const table of ['dataset', 'dataset_file', 'audit_event']) {
        const { rows } = await db.query<{ next: string; max: string }>(
          `select nextval(pg_get_serial_sequence('"${table}"', 'id')) as next, (select max(id) from "${table}") as max`,
        )
        expect(Number(rows[0]!.next), table).toBe(Number(rows[0]!.max) + 1)
      }
    } finally {
      await db.end()
    }
  }, 120_000)
})
