/**
 * Preview tiles and API responsiveness on the 10-million-row reference table
 * (../shared/bench/gen_locs.py), through the real server (server/main.ts) as in production:
 *
 * 1. The table is uploaded with the workstation uploader; while the server ingests it and then
 *    computes its quality report, /api/health is asked 20 times a second and its latency kept per
 *    phase. Target (issue: quality report): p99 < 50 ms while the report computes.
 * 2. Then 256 × 256 tiles at random positions and zoom levels, each asked once (so none comes
 *    from the disk cache), by 16 concurrent connections from wrk (Debian's `wrk`, which hardly
 *    competes for the two cores). Target: p95 < 50 ms.
 * 3. Then uncached tiles one at a time, per level (another view, so none is cached): the cost of
 *    one tile without a queue, to tell a slow level from a busy server.
 */
import { execFile, spawn } from 'node:child_process'
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { promisify } from 'node:util'
import type { PreviewInfo } from '@shared/schemas/preview.schema'
import { freePort, ServerProcess } from '../fixtures/server-process'
import { referenceTable } from './reference-pipeline'
import { runWrk } from './wrk'

const run = promisify(execFile)
const repo = fileURLToPath(new URL('../..', import.meta.url))
const DATASET = 'STPL-000005'
const TILE_CONNECTIONS = 16
const TILE_SECONDS = Number(process.env.BENCH_DURATION_S ?? 15)
const HEALTH_INTERVAL_MS = 50

const percentile = (values: number[], p: number) => {
  const sorted = [...values].sort((a, b) => a - b)
  return sorted[Math.min(sorted.length - 1, Math.floor((p / 100) * sorted.length))] ?? NaN
}
const r1 = (v: number) => Math.round(v * 10) / 10

/** /api/health, asked at a steady pace; each answer's latency is kept under the current phase. */
function healthSampler(url: string) {
  const latencies = new Map<string, number[]>()
  let phase = 'idle'
  let running = true
  const loop = (async () => {
    while (running) {
      const started = performance.now()
      const res = await fetch(`${url}/api/health`)
      await res.arrayBuffer()
      const ms = performance.now() - started
      if (!latencies.has(phase)) latencies.set(phase, [])
      latencies.get(phase)!.push(res.ok ? ms : Infinity)
      await new Promise((r) => setTimeout(r, Math.max(0, HEALTH_INTERVAL_MS - ms)))
    }
  })()
  return {
    set phase(name: string) {
      phase = name
    },
    async stop() {
      running = false
      await loop
      return Object.fromEntries(
        [...latencies].map(([name, ms]) => [
          name,
          `p50 ${r1(percentile(ms, 50))} / p99 ${r1(percentile(ms, 99))} / max ${r1(Math.max(...ms))} ms (${ms.length} requests)`,
        ]),
      )
    },
    p99: (name: string) => percentile(latencies.get(name) ?? [], 99),
  }
}

async function json<T>(url: string, token: string): Promise<T> {
  const res = await fetch(url, { headers: { authorization: `Bearer ${token}` } })
  if (!res.ok) throw new Error(`${url}: ${res.status} ${await res.text()}`)
  return (await res.json()) as T
}

async function until(check: () => Promise<boolean>, timeoutMs: number, what: string) {
  const deadline = Date.now() + timeoutMs
  while (!(await check())) {
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}`)
    await new Promise((r) => setTimeout(r, 250))
  }
}

/** Distinct tiles, uniformly among those that meet the table's bounds, over every level. */
function randomTilePaths(base: string, info: PreviewInfo, count: number, seed = 1): string[] {
  let state = seed >>> 0
  const random = () => {
    state = (Math.imul(state, 1664525) + 1013904223) >>> 0
    return state / 2 ** 32
  }
  const seen = new Set<string>()
  const paths: string[] = []
  for (let tries = 0; paths.length < count && tries < count * 20; tries++) {
    const z = Math.floor(random() * info.levels)
    const side = info.extentNm / 2 ** z
    const range = (min: number, max: number, origin: number) => {
      const first = Math.max(0, Math.floor((min - origin) / side))
      const last = Math.min(2 ** z - 1, Math.floor((max - origin) / side))
      return first + Math.floor(random() * (last - first + 1))
    }
    const x = range(info.boundsNm.xMin, info.boundsNm.xMax, info.originNm.x)
    const y = range(info.boundsNm.yMin, info.boundsNm.yMax, info.originNm.y)
    const key = `${z}/${x}/${y}`
    if (seen.has(key)) continue
    seen.add(key)
    paths.push(`${base}/${key}.png`)
  }
  return paths
}

function wrkTiles(url: string, token: string, pathsFile: string) {
  const script = join(repo, 'tests', 'bench', 'wrk-paths.lua')
  return runWrk(
    ['-t1', `-c${TILE_CONNECTIONS}`, `-d${TILE_SECONDS}s`, '--timeout', '10s'].concat([
      '-H',
      `Authorization: Bearer ${token}`,
      '-s',
      script,
      url,
    ]),
    {
      ...process.env,
      WRK_PATHS: pathsFile,
      WRK_SUMMARY: join(repo, 'tests', 'bench', 'wrk-percentiles.lua'),
    },
  )
}

/**
 * Uncached tiles asked one after another, per level (median and max of up to 20): where the time
 * of a single tile goes without any queue, to tell a slow level from a busy server. Another gamma
 * makes another view, so none of these comes from the cache the wrk run filled.
 */
async function tilesOneAtATime(
  url: string,
  tileBase: string,
  token: string,
  info: PreviewInfo,
): Promise<string> {
  const perLevel: string[] = []
  const all = randomTilePaths(tileBase, info, 4000, 100)
  for (let z = 0; z < info.levels; z++) {
    const paths = all.filter((p) => p.startsWith(`${tileBase}/${z}/`)).slice(0, 20)
    const ms: number[] = []
    for (const path of paths) {
      const started = performance.now()
      const res = await fetch(`${url}${path}?gamma=0.97`, {
        headers: { authorization: `Bearer ${token}` },
      })
      await res.arrayBuffer()
      ms.push(performance.now() - started)
    }
    if (ms.length) perLevel.push(`z${z} ${r1(percentile(ms, 50))}/${r1(Math.max(...ms))}`)
  }
  return `median/max per level: ${perLevel.join(', ')}`
}

export async function benchTiles(): Promise<Record<string, unknown>> {
  const table = await referenceTable()
  const dir = mkdtempSync(join(tmpdir(), 'stipple-bench-tiles-'))
  const dataDir = join(dir, 'data')
  const server = new ServerProcess(await freePort(), {
    DATA_DIR: dataDir,
    DEMO: 'true',
    DEMO_TABLES: 'false',
  })
  try {
    await server.start()
    const tokenRun = await run(
      process.execPath,
      [
        '--import',
        'tsx',
        'server/cli/admin.ts',
        'token',
        'create',
        'kasimir.feld@harrowgate.example',
      ],
      { cwd: repo, env: { ...process.env, DATA_DIR: dataDir } },
    )
    const token = tokenRun.stdout.trim().split('\n').at(-1)!
    const health = healthSampler(server.url)
    await new Promise((r) => setTimeout(r, 3000))

    health.phase = 'upload'
    await new Promise<void>((resolve, reject) => {
      const child = spawn(
        process.execPath,
        [
          '--import',
          'tsx',
          'server/cli/upload.ts',
          '--server',
          server.url,
          '--dataset',
          DATASET,
          table,
        ],
        { cwd: repo, env: { ...process.env, STIPPLE_TOKEN: token }, stdio: 'ignore' },
      )
      child.once('exit', (code) =>
        code === 0 ? resolve() : reject(new Error(`upload exit ${code}`)),
      )
    })
    const files = await json<{ items: { id: number; name: string }[] }>(
      `${server.url}/api/datasets/${DATASET}/files`,
      token,
    )
    const file = files.items.find((f) => table.endsWith(f.name))
    if (!file) throw new Error('the uploaded table is not listed')
    const base = `${server.url}/api/datasets/${DATASET}/files/${file.id}`
    const quality = () => json<{ status: string }>(`${base}/quality`, token).catch(() => null)

    health.phase = 'ingest'
    const ingestStarted = performance.now()
    await until(async () => (await quality())?.status === 'running', 15 * 60_000, 'the ingest')
    const ingestSeconds = (performance.now() - ingestStarted) / 1000
    health.phase = 'report'
    const reportStarted = performance.now()
    await until(async () => (await quality())?.status === 'done', 15 * 60_000, 'the report')
    const reportSeconds = (performance.now() - reportStarted) / 1000
    health.phase = 'after'
    await new Promise((r) => setTimeout(r, 2000))
    const healthFigures = await health.stop()

    const info = await json<PreviewInfo>(`${base}/preview`, token)
    const tileBase = `/api/datasets/${DATASET}/files/${file.id}/tiles`
    const paths = randomTilePaths(tileBase, info, 60_000)
    // Warm-up, not counted: the tile threads start and each level's brightness scale is derived
    // (once per view), one tile per level, none of them in the measured list.
    for (let z = 0; z < info.levels; z++) {
      const res = await fetch(`${server.url}${tileBase}/${z}/0/0.png?gamma=0.99`, {
        headers: { authorization: `Bearer ${token}` },
      })
      await res.arrayBuffer()
    }
    for (let z = 0; z < info.levels; z++) {
      const res = await fetch(`${server.url}${tileBase}/${z}/0/0.png`, {
        headers: { authorization: `Bearer ${token}` },
      })
      await res.arrayBuffer()
    }
    const warm = new Set(Array.from({ length: info.levels }, (_, z) => `${tileBase}/${z}/0/0.png`))
    const measured = paths.filter((p) => !warm.has(p))
    const pathsFile = join(dir, 'tile-paths.txt')
    writeFileSync(pathsFile, `${measured.join('\n')}\n`)
    const tiles = await wrkTiles(server.url, token, pathsFile)
    const reportP99 = health.p99('report')
    const tileP95 = tiles.p95 / 1000
    const alone = await tilesOneAtATime(server.url, tileBase, token, info)
    return {
      rows: info.localizations,
      levels: info.levels,
      ingestSeconds: r1(ingestSeconds),
      reportSeconds: r1(reportSeconds),
      health: Object.entries(healthFigures)
        .map(([phase, figures]) => `${phase}: ${figures}`)
        .join('; '),
      tileRequests: tiles.requests,
      tilesDistinct: tiles.requests <= measured.length,
      tileErrors: tiles.errors + tiles.non2xx,
      tilesPerSecond: Math.round(tiles.requests / (tiles.durationUs / 1e6)),
      tileMs: `p50 ${r1(tiles.p50 / 1000)} / p95 ${r1(tileP95)} / p99 ${r1(tiles.p99 / 1000)} / max ${r1(tiles.max / 1000)}`,
      oneAtATimeMs: alone,
      targets: 'tiles p95 < 50 ms (16 connections, uncached); health p99 < 50 ms during the report',
      targetsMet: tileP95 < 50 && reportP99 < 50 && tiles.errors + tiles.non2xx === 0,
    }
  } finally {
    await server.stop()
    rmSync(dir, { recursive: true, force: true })
  }
}
