/**
 * GET /api/datasets (page of 50, sorted) with 10,000 datasets, 50 concurrent connections on
 * loopback. The server runs as in production (server/main.ts), once with one HTTP process per core
 * (WEB_CONCURRENCY; the figures the target is judged on) and once as a single process, for
 * comparison; the load comes from wrk (or autocannon in this one). Prints p50/p95/p99 latency,
 * requests per second and the server's CPU time per request (all its processes). BENCH_PATH loads
 * another route the same way (e.g. /api/health, to see what the middleware alone costs);
 * BENCH_HTTP_WORKERS sets the worker count.
 */
import { execFile, spawn } from 'node:child_process'
import { promisify } from 'node:util'
import { mkdtempSync, readFileSync, rmSync } from 'node:fs'
import { availableParallelism, tmpdir } from 'node:os'
import { join } from 'node:path'
import autocannon from 'autocannon'
import { loadConfig } from '@server/config'
import { openDatabase } from '@server/db'
import { seedDatasets } from './seed-datasets'
import { runWrk } from './wrk'

const DATASETS = 10_000
const CONNECTIONS = 50
const DURATION_S = Number(process.env.BENCH_DURATION_S ?? 15)

function percentile(sorted: number[], p: number) {
  return sorted[Math.min(sorted.length - 1, Math.floor((p / 100) * sorted.length))]!
}

interface LoadResult {
  loadGenerator: string
  requests: number
  errors: number
  non2xx: number
  rps: number
  p50ms: number
  p95ms: number
  p99ms: number
}

const run = promisify(execFile)
const hasWrk = () =>
  run('wrk', ['--version']).then(
    () => true,
    (err: { stdout?: string }) => Boolean(err.stdout?.includes('wrk')),
  )

/** wrk (C, Debian package `wrk`) loads the server without competing much for the two cores. */
async function wrkLoad(url: string, authorization: string, seconds: number): Promise<LoadResult> {
  const script = new URL('./wrk-percentiles.lua', import.meta.url).pathname
  const w = await runWrk([
    '-t1',
    `-c${CONNECTIONS}`,
    `-d${seconds}s`,
    '-H',
    `Authorization: ${authorization}`,
    '-s',
    script,
    url,
  ])
  return {
    loadGenerator: 'wrk',
    requests: w.requests,
    errors: w.errors,
    non2xx: w.non2xx,
    rps: Math.round(w.requests / (w.durationUs / 1e6)),
    p50ms: w.p50 / 1000,
    p95ms: w.p95 / 1000,
    p99ms: w.p99 / 1000,
  }
}

/** Fallback when wrk is not installed: autocannon in this process (it takes a core of its own). */
async function autocannonLoad(
  url: string,
  authorization: string,
  seconds: number,
): Promise<LoadResult> {
  const latencies: number[] = []
  const result = await new Promise<autocannon.Result>((resolve, reject) => {
    const instance = autocannon(
      { url, headers: { authorization }, connections: CONNECTIONS, duration: seconds },
      (err, res) => (err ? reject(err) : resolve(res)),
    )
    instance.on('response', (_client, _status, _bytes, responseTime) =>
      latencies.push(responseTime),
    )
  })
  latencies.sort((a, b) => a - b)
  return {
    loadGenerator: 'autocannon',
    requests: result.requests.total,
    errors: result.errors,
    non2xx: result.non2xx,
    rps: Math.round(result.requests.average),
    p50ms: percentile(latencies, 50),
    p95ms: percentile(latencies, 95),
    p99ms: percentile(latencies, 99),
  }
}

async function startServer(
  dataDir: string,
  httpWorkers: number,
): Promise<{ url: string; pid: number | undefined; stop: () => Promise<void> }> {
  const child = spawn(
    process.execPath,
    [
      ...(process.env.BENCH_NODE_FLAGS ?? '').split(' ').filter(Boolean),
      '--import',
      'tsx',
      process.env.BENCH_MAIN ?? 'server/main.ts',
    ],
    {
      env: {
        ...process.env,
        DATA_DIR: dataDir,
        DEMO: 'false',
        LOG_LEVEL: 'error',
        NODE_ENV: 'development',
        PORT: process.env.BENCH_PORT ?? '0',
        WEB_CONCURRENCY: String(httpWorkers),
      },
      stdio: ['ignore', 'pipe', process.env.BENCH_SERVER_STDERR ? 'inherit' : 'ignore'],
    },
  )
  const url = await new Promise<string>((resolve, reject) => {
    let out = ''
    child.stdout.on('data', (chunk: Buffer) => {
      out += chunk.toString()
      const m = /running at (\S+)/.exec(out)
      if (m?.[1]) resolve(m[1])
    })
    child.once('exit', (code) => reject(new Error(`server exited with ${code}`)))
  })
  const exited = new Promise<void>((resolve) => child.once('exit', () => resolve()))
  return { url, pid: child.pid, stop: () => (child.kill('SIGTERM'), exited) }
}

/**
 * CPU seconds (user + system) a process and its children (the HTTP workers) have used so far,
 * from /proc on Linux; null elsewhere.
 */
function cpuSeconds(pid: number | undefined): number | null {
  try {
    const fields = readFileSync(`/proc/${pid}/stat`, 'utf8').split(') ')[1]!.split(' ')
    let seconds = (Number(fields[11]) + Number(fields[12])) / 100 // utime, stime in USER_HZ ticks
    for (const child of readFileSync(`/proc/${pid}/task/${pid}/children`, 'utf8').split(' '))
      if (child.trim()) seconds += cpuSeconds(Number(child)) ?? 0
    return seconds
  } catch {
    return null
  }
}

async function loadServer(dataDir: string, token: string, httpWorkers: number) {
  const server = await startServer(dataDir, httpWorkers)
  try {
    const path = process.env.BENCH_PATH ?? '/api/datasets?limit=50&offset=0&sort=-updatedAt'
    const headers = { authorization: `Bearer ${token}` }
    const probe = await fetch(server.url + path, { headers })
    const body = (await probe.json()) as { total: number; items: unknown[] }
    if (probe.status !== 200 || (body.items?.length ?? 50) !== 50)
      throw new Error(`unexpected answer ${probe.status}`)

    const load = (await hasWrk()) ? wrkLoad : autocannonLoad
    await load(server.url + path, headers.authorization, 3) // warm-up
    const cpuBefore = cpuSeconds(server.pid)
    const result = await load(server.url + path, headers.authorization, DURATION_S)
    const cpuAfter = cpuSeconds(server.pid)
    // Latency swings with whatever else the machine runs; server CPU per request is steadier.
    const serverCpuUsPerRequest =
      cpuBefore === null || cpuAfter === null
        ? null
        : Math.round(((cpuAfter - cpuBefore) * 1e6) / result.requests)
    return { visibleToUser: body.total, ...result, serverCpuUsPerRequest }
  } finally {
    await server.stop()
  }
}

export async function benchDatasetList() {
  const dataDir = mkdtempSync(join(tmpdir(), 'stipple-bench-list-'))
  const httpWorkers = Number(process.env.BENCH_HTTP_WORKERS ?? availableParallelism())
  try {
    const orm = await openDatabase(loadConfig({ DATA_DIR: dataDir, LOG_LEVEL: 'silent' }).dbPath)
    const token = await seedDatasets(orm.em.fork(), DATASETS)
    await orm.close()
    const single = await loadServer(dataDir, token, 1)
    const { visibleToUser, ...result } = await loadServer(dataDir, token, httpWorkers)
    return {
      datasets: DATASETS,
      visibleToUser,
      connections: CONNECTIONS,
      durationS: DURATION_S,
      httpWorkers,
      ...result,
      targetP95ms: 30,
      singleProcessRps: single.rps,
      singleProcessP50ms: single.p50ms,
      singleProcessP95ms: single.p95ms,
      singleProcessP99ms: single.p99ms,
      singleProcessCpuUs: single.serverCpuUsPerRequest,
    }
  } finally {
    rmSync(dataDir, { recursive: true, force: true })
  }
}
