/**
 * GET /api/datasets (page of 50, sorted) with 10,000 datasets, 50 concurrent connections on
 * loopback. The server runs in its own process (server/main.ts, as in production); the load comes
 * from autocannon in this one. Prints p50/p95/p99 latency and requests per second.
 */
import { spawn } from 'node:child_process'
import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import autocannon from 'autocannon'
import { loadConfig } from '@server/config'
import { openDatabase } from '@server/db'
import { seedDatasets } from './seed-datasets'

const DATASETS = 10_000
const CONNECTIONS = 50
const DURATION_S = Number(process.env.BENCH_DURATION_S ?? 15)

function percentile(sorted: number[], p: number) {
  return sorted[Math.min(sorted.length - 1, Math.floor((p / 100) * sorted.length))]!
}

async function startServer(dataDir: string): Promise<{ url: string; stop: () => void }> {
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/main.ts'], {
    env: { ...process.env, DATA_DIR: dataDir, PORT: '0', DEMO: 'false', LOG_LEVEL: 'error', NODE_ENV: 'development' },
    stdio: ['ignore', 'pipe', 'ignore'],
  })
  const url = await new Promise<string>((resolve, reject) => {
    let out = ''
    child.stdout.on('data', (chunk: Buffer) => {
      out += chunk.toString()
      const m = /running at (\S+)/.exec(out)
      if (m?.[1]) resolve(m[1])
    })
    child.once('exit', (code) => reject(new Error(`server exited with ${code}`)))
  })
  return { url, stop: () => child.kill('SIGTERM') }
}

export async function benchDatasetList() {
  const dataDir = mkdtempSync(join(tmpdir(), 'stipple-bench-list-'))
  const orm = await openDatabase(loadConfig({ DATA_DIR: dataDir, LOG_LEVEL: 'silent' }).dbPath)
  const token = await seedDatasets(orm.em.fork(), DATASETS)
  await orm.close()
  const server = await startServer(dataDir)
  try {
    const path = '/api/datasets?limit=50&offset=0&sort=-updatedAt'
    const headers = { authorization: `Bearer ${token}` }
    const probe = await fetch(server.url + path, { headers })
    const body = (await probe.json()) as { total: number; items: unknown[] }
    if (probe.status !== 200 || body.items.length !== 50) throw new Error(`unexpected answer ${probe.status}`)

    await autocannon({ url: server.url + path, headers, connections: CONNECTIONS, duration: 3 }) // warm-up
    const latencies: number[] = []
    const result = await new Promise<autocannon.Result>((resolve, reject) => {
      const instance = autocannon({ url: server.url + path, headers, connections: CONNECTIONS, duration: DURATION_S }, (err, res) =>
        err ? reject(err) : resolve(res),
      )
      instance.on('response', (_client, _status, _bytes, responseTime) => latencies.push(responseTime))
    })
    latencies.sort((a, b) => a - b)
    const figures = {
      datasets: DATASETS,
      visibleToUser: body.total,
      connections: CONNECTIONS,
      durationS: DURATION_S,
      requests: result.requests.total,
      non2xx: result.non2xx,
      errors: result.errors,
      rps: Math.round(result.requests.average),
      p50ms: percentile(latencies, 50),
      p95ms: percentile(latencies, 95),
      p99ms: percentile(latencies, 99),
      targetP95ms: 30,
    }
    return figures
  } finally {
    server.stop()
    rmSync(dataDir, { recursive: true, force: true })
  }
}
