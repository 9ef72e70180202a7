/**
 * A tus upload of a 2 GB file over loopback (server and client in their own processes, the SHA-256
 * computed in the same pass, the file flushed to disk at the end) against `dd … conv=fdatasync`
 * writing a new file of the same size to the same disk, in the same run. Target: ≥ 80 % of dd.
 */
import { execFile, spawn } from 'node:child_process'
import { createHash } from 'node:crypto'
import { createReadStream, createWriteStream, mkdtempSync, readFileSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { writeFile } from 'node:fs/promises'
import { promisify } from 'node:util'
import { freePort, ServerProcess } from '../fixtures/server-process'

const run = promisify(execFile)
const SIZE_MB = Number(process.env.BENCH_UPLOAD_MB ?? 2048)
const BYTES = SIZE_MB * 1024 * 1024
const ROUNDS = 3
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!

export async function makeSource(path: string) {
  const block = Buffer.alloc(16 << 20)
  for (let i = 0; i < block.length; i += 4) block.writeUInt32LE((i * 2654435761) >>> 0, i)
  const out = createWriteStream(path)
  for (let written = 0; written < BYTES; written += block.length) {
    block.writeUInt32LE(written >>> 0, 0)
    if (!out.write(Buffer.from(block))) await new Promise<void>((r) => out.once('drain', () => r()))
  }
  await new Promise<void>((r) => out.end(() => r()))
}

export async function sha256(path: string) {
  const hash = createHash('sha256')
  for await (const chunk of createReadStream(path, {
    highWaterMark: 8 << 20,
  }) as AsyncIterable<Buffer>)
    hash.update(chunk)
  return hash.digest('hex')
}

async function ddSeconds(dir: string): Promise<number> {
  const started = performance.now()
  await run('dd', [
    'if=/dev/zero',
    `of=${join(dir, 'dd.bin')}`,
    'bs=16M',
    `count=${SIZE_MB / 16}`,
    'conv=fdatasync',
  ])
  const seconds = (performance.now() - started) / 1000
  rmSync(join(dir, 'dd.bin'))
  return seconds
}

/** The workstation uploader's file reader (server/cli/file-slices.ts), as `stipple-upload` uses it. */
const FILE_SLICES = new URL('../../server/cli/file-slices.ts', import.meta.url).href

/**
 * tus-js-client in a child process, set up as the workstation uploader sets it up (its file
 * reader, 256 MiB requests), timing from the first request to the server's last answer.
 */
export async function uploadSeconds(
  url: string,
  token: string,
  source: string,
  round: number,
): Promise<{ seconds: number; clientCpuSeconds: number }> {
  const script = `
    import { createReadStream } from 'node:fs'
    import { Upload } from 'tus-js-client'
    import { fileSlices } from ${JSON.stringify(FILE_SLICES)}
    const started = performance.now()
    new Upload(createReadStream(${JSON.stringify(source)}), {
      endpoint: ${JSON.stringify(`${url}/api/uploads`)}, headers: { Authorization: 'Bearer ${token}' },
      metadata: { dataset: 'STPL-000005', filename: 'bench-${round}.bin' }, uploadSize: ${BYTES}, chunkSize: 256 * 1024 * 1024,
      fileReader: fileSlices,
      onSuccess: () => {
        const cpu = process.cpuUsage()
        console.log('SECONDS', (performance.now() - started) / 1000, (cpu.user + cpu.system) / 1e6)
      },
      onError: (e) => { console.error(String(e)); process.exit(1) },
    }).start()`
  const child = spawn(process.execPath, ['--import', 'tsx', '--input-type=module', '-e', script], {
    stdio: ['ignore', 'pipe', 'inherit'],
  })
  let out = ''
  child.stdout.on('data', (d: Buffer) => (out += d.toString()))
  await new Promise((r) => child.once('exit', r))
  const m = /SECONDS (\S+) (\S+)/.exec(out)
  if (!m) throw new Error(`upload failed: ${out}`)
  return { seconds: Number(m[1]), clientCpuSeconds: Number(m[2]) }
}

/**
 * Waits until the server has been all but idle for a second (the demo's own files are processed
 * by jobs right after start, and each upload queues its inspection), so a round measures the
 * upload alone.
 */
export async function serverIdle(pid: number | undefined): Promise<void> {
  for (let tries = 0; tries < 120; tries++) {
    const before = cpuSeconds(pid)
    await new Promise((r) => setTimeout(r, 1000))
    if (!(cpuSeconds(pid) - before > 0.05)) return
  }
}

/** CPU seconds (user + system) a process has used so far, from /proc on Linux; NaN elsewhere. */
export function cpuSeconds(pid: number | undefined): number {
  try {
    const fields = readFileSync(`/proc/${pid}/stat`, 'utf8').split(') ')[1]!.split(' ')
    return (Number(fields[11]) + Number(fields[12])) / 100 // utime, stime in clock ticks (USER_HZ)
  } catch {
    return NaN
  }
}

export async function benchUpload(): Promise<Record<string, unknown>> {
  const dir = mkdtempSync(join(tmpdir(), 'stipple-bench-upload-'))
  const server = new ServerProcess(await freePort(), { DATA_DIR: join(dir, 'data'), DEMO: 'true' })
  try {
    const source = join(dir, 'source.bin')
    await makeSource(source)
    await server.start()
    const { stdout } = await run(
      process.execPath,
      [
        '--import',
        'tsx',
        'server/cli/admin.ts',
        'token',
        'create',
        'kasimir.feld@harrowgate.example',
      ],
      { env: { ...process.env, DATA_DIR: join(dir, 'data') } },
    )
    const token = stdout.trim().split('\n').at(-1)!
    // The disk's speed drifts from one minute to the next on a shared machine, so dd and the
    // upload take turns, three rounds, and the medians are compared.
    const dds: number[] = []
    const uploads: number[] = []
    const serverCpu: number[] = []
    const clientCpu: number[] = []
    for (let round = 0; round < ROUNDS; round++) {
      dds.push(await ddSeconds(dir))
      // A different first byte each round, or the dataset would refuse the copy as a duplicate.
      await writeFile(source, Buffer.from([round]), { flag: 'r+' })
      await serverIdle(server.child?.pid)
      const cpuBefore = cpuSeconds(server.child?.pid)
      const upload = await uploadSeconds(server.url, token, source, round)
      serverCpu.push(cpuSeconds(server.child?.pid) - cpuBefore)
      uploads.push(upload.seconds)
      clientCpu.push(upload.clientCpuSeconds)
    }
    const res = await fetch(`${server.url}/api/datasets/STPL-000005/files`, {
      headers: { authorization: `Bearer ${token}` },
    })
    const stored = ((await res.json()) as { items: { name: string; sha256: string }[] }).items.find(
      (f) => f.name === `bench-${ROUNDS - 1}.bin`,
    )
    const expected = await sha256(source)
    const ddMBps = BYTES / 1e6 / median(dds)
    const uploadMBps = BYTES / 1e6 / median(uploads)
    return {
      megabytes: Math.round(BYTES / 1e6),
      ddSeconds: dds.map((x) => x.toFixed(2)).join(' / '),
      ddMBps: Math.round(ddMBps),
      uploadSeconds: uploads.map((x) => x.toFixed(2)).join(' / '),
      uploadMBps: Math.round(uploadMBps),
      // Where the two cores go: CPU seconds (user + system) of each side per upload.
      serverCpuSeconds: serverCpu.map((x) => x.toFixed(1)).join(' / '),
      clientCpuSeconds: clientCpu.map((x) => x.toFixed(1)).join(' / '),
      ratio: Number((uploadMBps / ddMBps).toFixed(2)),
      target: '≥ 0.80',
      sha256Matches: stored?.sha256 === expected,
    }
  } finally {
    await server.stop()
    rmSync(dir, { recursive: true, force: true })
  }
}
