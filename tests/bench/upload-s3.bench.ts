/**
 * The same tus upload of a 2 GiB file (tus-js-client in its own process, set up as the
 * workstation uploader, 256 MiB requests) to two Stipple servers in the same run: the embedded
 * default (SQLite, the data directory) and the cluster profile (a throwaway PostgreSQL and the
 * S3 stand-in, s3rver, on this machine: the bytes go to the bucket as 8 MiB parts and the
 * original is an object copy). MB/s of each and their ratio; the SHA-256 each server recorded
 * is checked against the source's, and on the cluster profile against the object in the bucket.
 */
import { execFile } from 'node:child_process'
import { createHash } from 'node:crypto'
import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import type { Readable } from 'node:stream'
import { promisify } from 'node:util'
import { GetObjectCommand } from '@aws-sdk/client-s3'
import { startPostgres, type PostgresServer } from '../fixtures/postgres'
import { startS3, type S3Fixture } from '../fixtures/s3'
import { freePort, ServerProcess } from '../fixtures/server-process'
import { cpuSeconds, makeSource, serverIdle, sha256, uploadSeconds } from './upload.bench'

const run = promisify(execFile)
const SIZE_MB = Number(process.env.BENCH_UPLOAD_MB ?? 2048)
const BYTES = SIZE_MB * 1024 * 1024
const DEPOSITOR = 'kasimir.feld@harrowgate.example'
const DATASET = 'STPL-000005'
const PREFIX = 'bench/'

interface Stored {
  id: number
  name: string
  sha256: string
  storageKey?: string
}

async function tokenFor(env: Record<string, string>): Promise<string> {
  const { stdout } = await run(
    process.execPath,
    ['--import', 'tsx', 'server/cli/admin.ts', 'token', 'create', DEPOSITOR],
    { env: { ...process.env, ...env } },
  )
  return stdout.trim().split('\n').at(-1)!
}

/** One upload to a started server: seconds, CPU seconds of both sides, the file it recorded. */
async function measure(server: ServerProcess, token: string, source: string, round: number) {
  await serverIdle(server.child?.pid)
  const cpuBefore = cpuSeconds(server.child?.pid)
  const upload = await uploadSeconds(server.url, token, source, round)
  const serverCpu = cpuSeconds(server.child?.pid) - cpuBefore
  const res = await fetch(`${server.url}/api/datasets/${DATASET}/files`, {
    headers: { authorization: `Bearer ${token}` },
  })
  const stored = ((await res.json()) as { items: Stored[] }).items.find(
    (f) => f.name === `bench-${round}.bin`,
  )
  return { ...upload, serverCpu, stored }
}

async function objectSha256(s3: S3Fixture, key: string): Promise<string> {
  const res = await s3.client.send(new GetObjectCommand({ Bucket: s3.bucket, Key: key }))
  const hash = createHash('sha256')
  for await (const chunk of res.Body as Readable) hash.update(chunk as Buffer)
  return hash.digest('hex')
}

export async function benchUploadS3(): Promise<Record<string, unknown>> {
  const dir = mkdtempSync(join(tmpdir(), 'stipple-bench-upload-s3-'))
  let postgres: PostgresServer | null = null
  let s3: S3Fixture | null = null
  const servers: ServerProcess[] = []
  try {
    const source = join(dir, 'source.bin')
    await makeSource(source)
    const expected = await sha256(source)
    ;[postgres, s3] = await Promise.all([startPostgres(), startS3('bench-uploads')])
    const embeddedEnv = { DATA_DIR: join(dir, 'embedded'), DEMO: 'true', DEMO_TABLES: 'false' }
    const clusterEnv = {
      DATA_DIR: join(dir, 'cluster'),
      DATABASE_URL: await postgres.createDatabase(),
      ...s3.env(PREFIX),
      DEMO: 'true',
      DEMO_TABLES: 'false',
    }
    const embedded = new ServerProcess(await freePort(), embeddedEnv)
    const cluster = new ServerProcess(await freePort(), clusterEnv)
    servers.push(embedded, cluster)
    // One after the other: the two cores are the client's and the server's during an upload.
    await embedded.start()
    const local = await measure(embedded, await tokenFor(embeddedEnv), source, 0)
    await embedded.stop()
    await cluster.start()
    const bucket = await measure(cluster, await tokenFor(clusterEnv), source, 1)
    const inBucket = bucket.stored
      ? await objectSha256(
          s3,
          `${PREFIX}files/${(await storageKeyOf(clusterEnv.DATABASE_URL, bucket.stored.id)) ?? ''}`,
        )
      : null
    const localMBps = BYTES / 1e6 / local.seconds
    const s3MBps = BYTES / 1e6 / bucket.seconds
    return {
      megabytes: Math.round(BYTES / 1e6),
      embeddedSeconds: local.seconds.toFixed(2),
      embeddedMBps: Math.round(localMBps),
      s3Seconds: bucket.seconds.toFixed(2),
      s3MBps: Math.round(s3MBps),
      ratio: Number((s3MBps / localMBps).toFixed(2)),
      serverCpuSeconds: `${local.serverCpu.toFixed(1)} / ${bucket.serverCpu.toFixed(1)}`,
      clientCpuSeconds: `${local.clientCpuSeconds.toFixed(1)} / ${bucket.clientCpuSeconds.toFixed(1)}`,
      embeddedSha256Ok: local.stored?.sha256 === expected,
      s3Sha256Ok: bucket.stored?.sha256 === expected && inBucket === expected,
    }
  } finally {
    for (const server of servers) await server.stop()
    await s3?.stop()
    await postgres?.stop()
    rmSync(dir, { recursive: true, force: true })
  }
}

/** The file's storage key, read from the cluster's database (the API does not show it). */
async function storageKeyOf(databaseUrl: string, fileId: number): Promise<string | null> {
  const { default: pg } = await import('pg')
  const client = new pg.Client({ connectionString: databaseUrl })
  await client.connect()
  try {
    const { rows } = await client.query<{ storage_key: string }>(
      'select storage_key from dataset_file where id = $1',
      [fileId],
    )
    return rows[0]?.storage_key ?? null
  } finally {
    await client.end()
  }
}
