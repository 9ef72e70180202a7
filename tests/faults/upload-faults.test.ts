/**
 * Faults: the server is killed with SIGKILL at random points while the workstation CLI uploads a
 * few hundred MB, and restarted; the CLI resumes each time. The stored SHA-256 must equal the
 * source's, and nothing may be registered twice.
 */
import { execFile, spawn } from 'node:child_process'
import { createHash } from 'node:crypto'
import {
  createReadStream,
  createWriteStream,
  mkdtempSync,
  readdirSync,
  rmSync,
  statSync,
} from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { promisify } from 'node:util'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { freePort, ServerProcess } from '../fixtures/server-process'

const run = promisify(execFile)
const SIZE = 256 * 1024 * 1024
const KILLS = 10
let dir: string
let server: ServerProcess
let source: string
let token: string

async function sha256File(path: string) {
  const hash = createHash('sha256')
  for await (const chunk of createReadStream(path, {
    highWaterMark: 4 << 20,
  }) as AsyncIterable<Buffer>)
    hash.update(chunk)
  return hash.digest('hex')
}

/** A deterministic pseudo-random file (xorshift32), so every run uploads the same bytes. */
async function writeSource(path: string, size: number) {
  const out = createWriteStream(path)
  let x = 2463534242
  for (let written = 0; written < size; written += 1 << 20) {
    const block = Buffer.alloc(1 << 20)
    for (let i = 0; i < block.length; i += 4) {
      x ^= x << 13
      x ^= x >>> 17
      x ^= x << 5
      block.writeUInt32LE(x >>> 0, i)
    }
    if (!out.write(block)) await new Promise<void>((r) => out.once('drain', () => r()))
  }
  await new Promise<void>((r) => out.end(() => r()))
}

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'stipple-faults-'))
  source = join(dir, 'stack-0001.bin')
  await writeSource(source, SIZE)
  server = new ServerProcess(await freePort(), { DATA_DIR: join(dir, 'data'), DEMO: 'true' })
  await server.start()
  const created = await run(
    process.execPath,
    [
      '--import',
      'tsx',
      'server/cli/admin.ts',
      'token',
      'create',
      'kasimir.feld@harrowgate.example',
    ],
    {
      env: { ...process.env, DATA_DIR: join(dir, 'data') },
    },
  )
  token = created.stdout.trim().split('\n').at(-1)!
}, 120_000)

afterAll(async () => {
  await server?.stop()
  rmSync(dir, { recursive: true, force: true })
})

/** Bytes of the upload in progress on the server's disk (the tus file), or null before it exists. */
function uploadedBytes(): number | null {
  const uploads = join(dir, 'data', 'uploads')
  const file = readdirSync(uploads).find((n) => !n.endsWith('.json'))
  return file ? statSync(join(uploads, file)).size : null
}

describe('an upload from the CLI through repeated server crashes', () => {
  it(`survives ${KILLS} SIGKILLs at random points and stores exactly the source's bytes`, async () => {
    // Each kill lands a random 2–12 MB after the bytes already on disk, so all of them fall mid-upload.
    const nextTarget = () =>
      (uploadedBytes() ?? 0) + Math.floor((2 + 10 * Math.random()) * 1024 * 1024)
    const cli = spawn(
      process.execPath,
      [
        'server/cli/stipple-upload.mjs',
        '--server',
        server.url,
        '--dataset',
        'STPL-000005',
        '--chunk-mib',
        '4',
        '--retries',
        '40',
        '--state',
        join(dir, 'cli-state.json'),
        '--quiet',
        source,
      ],
      {
        env: { ...process.env, STIPPLE_TOKEN: token },
        stdio: ['ignore', 'pipe', 'pipe'],
      },
    )
    let output = ''
    cli.stdout.on('data', (d: Buffer) => (output += d.toString()))
    cli.stderr.on('data', (d: Buffer) => (output += d.toString()))
    const exited = new Promise<number>((resolve) => cli.once('exit', (code) => resolve(code ?? -1)))
    let done = false
    void exited.then(() => (done = true))

    const killedAt: number[] = []
    for (let kill = 0; kill < KILLS; kill++) {
      const target = nextTarget()
      while (!done && (uploadedBytes() ?? 0) < target) await new Promise((r) => setTimeout(r, 5))
      if (done) break
      killedAt.push(uploadedBytes() ?? 0)
      await server.kill()
      await new Promise((r) => setTimeout(r, 100 + Math.random() * 400))
      await server.start()
    }
    const code = await exited
    expect(code, output).toBe(0)
    expect(killedAt.length).toBeGreaterThanOrEqual(KILLS)
    // Every restart was a resumption of the one upload, never a new start: no abandoned part is left.
    expect(readdirSync(join(dir, 'data', 'uploads'))).toEqual([])

    const expected = await sha256File(source)
    const res = await fetch(`${server.url}/api/datasets/STPL-000005/files`, {
      headers: { authorization: `Bearer ${token}` },
    })
    const { items } = (await res.json()) as {
      items: { name: string; size: number; sha256: string }[]
    }
    const stored = items.filter((f) => f.name.startsWith('stack-0001'))
    expect(stored).toEqual([
      expect.objectContaining({ name: 'stack-0001.bin', size: SIZE, sha256: expected }),
    ])
    expect(output).toContain(`sha256 ${expected} (verified)`)
  }, 240_000)

  it('a table ingest killed mid-way starts again after the restart and completes', async () => {
    const rows = 4_000_000
    const table = join(dir, 'locs-big.csv')
    const out = createWriteStream(table)
    out.write('frame,x [nm],y [nm],photons\n')
    let x = 1
    for (let start = 0; start < rows; start += 100_000) {
      let block = ''
      for (let i = start; i < start + 100_000; i++) {
        x = (x * 48271) % 2147483647
        block += `${1 + (i % 20000)},${(x % 4_000_000) / 100},${((x >>> 7) % 4_000_000) / 100},${500 + (x % 3000)}\n`
      }
      if (!out.write(block)) await new Promise<void>((r) => out.once('drain', () => r()))
    }
    await new Promise<void>((r) => out.end(() => r()))
    await run(
      process.execPath,
      [
        'server/cli/stipple-upload.mjs',
        '--server',
        server.url,
        '--dataset',
        'STPL-000005',
        '--state',
        join(dir, 'cli-state-2.json'),
        '--quiet',
        table,
      ],
      { env: { ...process.env, STIPPLE_TOKEN: token } },
    )

    const files = async () => {
      const res = await fetch(`${server.url}/api/datasets/STPL-000005/files`, {
        headers: { authorization: `Bearer ${token}` },
      })
      return (
        (await res.json()) as {
          items: {
            id: number
            name: string
            status: string
            job: { state: string; progress: number } | null
          }[]
        }
      ).items.find((f) => f.name === 'locs-big.csv')
    }
    let killed = false
    for (const end = Date.now() + 60_000; Date.now() < end;) {
      const f = await files()
      if (f?.job?.state === 'running' && f.job.progress > 0.05 && f.job.progress < 0.9) {
        await server.kill()
        killed = true
        break
      }
      if (f?.status === 'ready') break
      await new Promise((r) => setTimeout(r, 10))
    }
    expect(killed, 'the ingest finished before it could be interrupted').toBe(true)
    await server.start()
    let settled: Awaited<ReturnType<typeof files>>
    for (const end = Date.now() + 120_000; Date.now() < end;) {
      settled = await files()
      if (settled && settled.status !== 'processing') break
      await new Promise((r) => setTimeout(r, 200))
    }
    expect(settled!.status).toBe('ready')
    const report = await fetch(
      `${server.url}/api/datasets/STPL-000005/files/${settled!.id}/validation`,
      { headers: { authorization: `Bearer ${token}` } },
    )
    expect(
      ((await report.json()) as { report: { rowsAccepted: number } }).report.rowsAccepted,
    ).toBe(rows)
  }, 240_000)
})
