/**
 * Faults on the cluster profile: a real app node (server/main.ts in its own process) on a
 * throwaway PostgreSQL and an S3 stand-in, with tus-js-client uploading in 4 MiB requests. In the
 * middle of the upload the bucket goes away (the stand-in is stopped, then started again on the
 * same port with the same objects), and in another upload the database does (fast shutdown,
 * then started again on the same port and data). The client is told to try again (503) while
 * they are away, resumes once they are back, and the file is registered once with the source's
 * SHA-256; nothing is left half-registered (no reservation, no upload object, no open multipart
 * upload in the bucket).
 */
import { execFile } from 'node:child_process'
import { createHash, randomBytes } from 'node:crypto'
import { promisify } from 'node:util'
import { ListMultipartUploadsCommand, ListObjectsV2Command } from '@aws-sdk/client-s3'
import pg from 'pg'
import { Upload as TusClient } from 'tus-js-client'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { AppNode } from '../fixtures/app-node'
import { apiOf, DEPOSITOR } from '../fixtures/node-cluster'
import { startPostgres, type PostgresServer } from '../fixtures/postgres'
import { startS3, type S3Fixture } from '../fixtures/s3'
import { freePort } from '../fixtures/server-process'

const run = promisify(execFile)
const MiB = 1024 * 1024
const PREFIX = 'stipple/'
/** How long each dependency stays away. */
const OUTAGE_MS = 4000

let postgres: PostgresServer
let s3: S3Fixture
let node: AppNode
let db: pg.Pool
let token: string
let accession: string

beforeAll(async () => {
  ;[postgres, s3] = await Promise.all([startPostgres(), startS3('outages')])
  const databaseUrl = await postgres.createDatabase()
  db = new pg.Pool({ connectionString: databaseUrl, max: 1 })
  // Its idle connection goes with the database's outage; the next query opens another.
  db.on('error', () => undefined)
  const env = {
    DATABASE_URL: databaseUrl,
    ...s3.env(PREFIX),
    DEMO: 'true',
    DEMO_TABLES: 'false',
  }
  node = new AppNode('outages', await freePort(), env)
  await node.start()
  const { stdout } = await run(
    process.execPath,
    ['--import', 'tsx', 'server/cli/admin.ts', 'token', 'create', DEPOSITOR.login],
    { env: { ...process.env, ...env, DATA_DIR: node.dataDir } },
  )
  token = stdout.trim().split('\n').at(-1)!
  const api = apiOf(token)
  const projects = (await (await api(node, '/api/projects')).json()) as { items: { id: number }[] }
  const created = await api(node, '/api/datasets', {
    method: 'POST',
    body: JSON.stringify({
      projectId: projects.items[0]!.id,
      title: 'Outages',
      description: 'Made by the upload outage tests.',
    }),
  })
  expect(created.status).toBe(201)
  ;({ accession } = (await created.json()) as { accession: string })
}, 180_000)

afterAll(async () => {
  await node?.dispose()
  await db?.end()
  await s3?.stop()
  await postgres?.stop()
})

interface Outcome {
  fileId: string | null
  /** Every answer the client got, as "METHOD status", in order. */
  answers: string[]
  error: string | null
}

/**
 * tus-js-client uploading `data`, retrying every half second for up to a minute; once `at` bytes
 * have been sent, `outage` runs (while the upload goes on retrying).
 */
function uploadThrough(data: Buffer, name: string, at: number, outage: () => Promise<void>) {
  const answers: string[] = []
  let began: Promise<void> | null = null
  const done = new Promise<Outcome>((resolve) => {
    const client = new TusClient(data, {
      endpoint: `${node.url}/api/uploads`,
      headers: { Authorization: `Bearer ${token}` },
      metadata: { dataset: accession, filename: name },
      chunkSize: 4 * MiB,
      retryDelays: Array<number>(120).fill(500),
      onAfterResponse: (req, res) => void answers.push(`${req.getMethod()} ${res.getStatus()}`),
      onProgress: (sent) => {
        if (sent >= at && !began) began = outage()
      },
      onSuccess: ({ lastResponse }) =>
        resolve({
          fileId: lastResponse.getHeader('Stipple-File-Id') ?? null,
          answers,
          error: null,
        }),
      onError: (err) => resolve({ fileId: null, answers, error: String(err) }),
    })
    client.start()
  })
  return done.then(async (outcome) => {
    await began
    return outcome
  })
}

/** What the bucket holds below the node's prefix: objects by key, and open multipart uploads. */
async function bucketState() {
  const listed = await s3.client.send(
    new ListObjectsV2Command({ Bucket: s3.bucket, Prefix: PREFIX }),
  )
  const open = await s3.client.send(
    new ListMultipartUploadsCommand({ Bucket: s3.bucket, Prefix: PREFIX }),
  )
  return {
    objects: (listed.Contents ?? []).map((o) => o.Key!.slice(PREFIX.length)),
    multipart: (open.Uploads ?? []).map((u) => u.Key!),
  }
}

/**
 * While the dependency was away the client was told to try again (503 on writes, 423 on the
 * HEAD it resumes with, the one failed HEAD tus-js-client retries), it never started over (one
 * creation), and nothing was refused.
 */
function expectPausedAndResumed(outcome: Outcome) {
  const { answers } = outcome
  const said = answers.join(', ')
  expect(
    answers.filter((a) => a.startsWith('POST')),
    said,
  ).toEqual(['POST 201'])
  expect(answers, said).toContain('PATCH 503')
  expect(answers, said).toContain('HEAD 423')
  expect(
    answers.filter((a) => /^\w+ 4/.test(a) && a !== 'HEAD 423'),
    said,
  ).toEqual([])
  expect(answers.at(-1)).toBe('PATCH 204')
}

/** The upload ended as one file with the source's bytes, and nothing else of it is left. */
async function expectRegisteredOnce(outcome: Outcome, data: Buffer, name: string) {
  expect(outcome.error, node.output).toBeNull()
  const rows = await db.query<{ id: number; sha256: string; size: string; storage_key: string }>(
    `select id, sha256, size, storage_key from dataset_file where name = $1`,
    [name],
  )
  expect(rows.rows).toHaveLength(1)
  const [row] = rows.rows
  expect(String(row!.id)).toBe(outcome.fileId)
  expect(row!.sha256).toBe(createHash('sha256').update(data).digest('hex'))
  expect(Number(row!.size)).toBe(data.length)
  expect((await db.query('select 1 from upload_reservation')).rowCount).toBe(0)
  const { objects, multipart } = await bucketState()
  expect(objects.filter((k) => k.startsWith('uploads/'))).toEqual([])
  expect(multipart).toEqual([])
  expect(objects).toContain(`files/${row!.storage_key}`)
  // The bytes the node serves are the source's.
  const download = await apiOf(token)(node, `/api/datasets/${accession}/files/${row!.id}/content`)
  expect(
    createHash('sha256')
      .update(Buffer.from(await download.arrayBuffer()))
      .digest('hex'),
  ).toBe(row!.sha256)
}

const pause = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms))

describe('an upload on the cluster profile while a dependency is away', () => {
  it.each(['bucket', 'database'] as const)(
    'the %s: 503s while it is away, resumed when it is back, the right SHA-256, registered once',
    async (what) => {
      const dependency = what === 'bucket' ? s3 : postgres
      const data = randomBytes(40 * MiB)
      const name = `${what}-outage.bin`
      const outcome = await uploadThrough(data, name, 12 * MiB, async () => {
        await dependency.down()
        await pause(OUTAGE_MS)
        await dependency.up()
      })
      expectPausedAndResumed(outcome)
      await expectRegisteredOnce(outcome, data, name)
    },
  )
})
