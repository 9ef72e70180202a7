/**
 * GET /api/datasets under the load a browse page, its search box and paging scripts make: 50
 * connections on loopback, each request a random offset, one of six sorts, a search term in about
 * one in three (terms matching many datasets, few, or none), asked as one of several people (a
 * member of one project, a member of four, a collaborator with a few shares, a steward, signed
 * out). wrk (Debian's `wrk`, C, one thread) drives it with wrk-datasets-mixed.lua, so the load
 * generator hardly competes for the two cores. The server runs as in production (server/main.ts,
 * one HTTP process per core unless BENCH_HTTP_WORKERS says otherwise).
 *
 * Lines: the mixed load on 10 000 datasets (the figures the targets are judged on), the same on
 * one HTTP process, the old repeated query (one person, one page, one sort: what the list's cache
 * serves), and the mixed load on 100 000 datasets. Each gives p50/p95/p99, requests per second,
 * the server's CPU time per request (all its processes, from /proc), the share of answers served
 * whole from the list's page cache, and the database time per answer not served so (both from
 * Server-Timing; results and encoded rows the list keeps per access version count as not cached,
 * their effect is that database time).
 * BENCH_DURATION_S sets the seconds per line; BENCH_LARGE=0 skips the 100 000 line.
 */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs'
import { availableParallelism, tmpdir } from 'node:os'
import { join } from 'node:path'
import { cpuSeconds, startServer, withDatasets } from './bench-server'
import type { BenchPeople } from './seed-datasets'
import { runWrk } from './wrk'

export const CONNECTIONS = 50
export const DURATION_S = Number(process.env.BENCH_DURATION_S ?? 15)
const SORTS = ['-updatedAt', '-createdAt', 'title', '-title', 'accession', 'state']
/** Search words: many matches (a tenth to all), few (one in 500, one, one in 30), none. */
const TERMS = [
  'tubulin',
  'PAINT',
  'series',
  'HeLa',
  'clath',
  'cryo',
  'STPL-000777',
  'gephyrin mEos3.2',
  'zebrafish',
  'nanobody expansion',
]

/** What one load asks for: whose tokens, which sorts and terms, how deep. */
interface LoadMix {
  tokens: string[]
  sorts: string[]
  terms: string[]
  searchEvery: number
  maxOffset: number
  searchMaxOffset: number
}

export function mixedLoad(people: BenchPeople): LoadMix {
  return {
    tokens: [people.member, people.depositor, people.collaborator, people.steward, '-'],
    sorts: SORTS,
    terms: TERMS.map(encodeURIComponent),
    searchEvery: 3,
    maxOffset: 5000,
    // A search is read from its first pages; deeper offsets mostly fall past its end.
    searchMaxOffset: 500,
  }
}

/** The old benchmark: one person, one sort, the first page, again and again. */
export const repeatedLoad = (people: BenchPeople): LoadMix => ({
  tokens: [people.depositor],
  sorts: ['-updatedAt'],
  terms: [],
  searchEvery: 0,
  maxOffset: 0,
  searchMaxOffset: 0,
})

interface ListStats {
  cached: number
  fresh: number
  searched: number
  dbUs: number
  /** Answers other than 2xx by status. */
  refused: Record<string, number>
}

async function wrkLoad(url: string, mix: LoadMix, seconds: number) {
  const dir = mkdtempSync(join(tmpdir(), 'stipple-bench-wrk-'))
  const statsFile = join(dir, 'stats.json')
  try {
    const summary = await runWrk(
      [
        '-t1',
        `-c${CONNECTIONS}`,
        `-d${seconds}s`,
        '--timeout',
        '10s',
        '-s',
        new URL('./wrk-datasets-mixed.lua', import.meta.url).pathname,
        url,
      ],
      {
        ...process.env,
        WRK_SUMMARY: new URL('./wrk-percentiles.lua', import.meta.url).pathname,
        LIST_TOKENS: mix.tokens.join(','),
        LIST_SORTS: mix.sorts.join(','),
        LIST_TERMS: mix.terms.join(','),
        LIST_SEARCH_EVERY: String(mix.searchEvery),
        LIST_LIMIT: '50',
        LIST_MAX_OFFSET: String(mix.maxOffset),
        LIST_SEARCH_MAX_OFFSET: String(mix.searchMaxOffset),
        LIST_SEED: '7',
        LIST_STATS: statsFile,
      },
    )
    const stats = JSON.parse(readFileSync(statsFile, 'utf8')) as ListStats
    return { ...summary, ...stats }
  } finally {
    rmSync(dir, { recursive: true, force: true })
  }
}

/** Every person gets a first page before the load: a wrong answer stops the benchmark. */
async function probe(url: string, people: BenchPeople) {
  const visible: Record<string, number> = {}
  for (const [who, token] of Object.entries({ ...people, signedOut: '-' })) {
    const headers: Record<string, string> =
      token === '-' ? {} : { authorization: `Bearer ${token}` }
    const res = await fetch(`${url}/api/datasets?limit=50&sort=title`, { headers })
    const body = (await res.json()) as { total: number; items: unknown[] }
    if (res.status !== 200 || body.items.length !== 50)
      throw new Error(`${who}: unexpected answer ${res.status}`)
    visible[who] = body.total
  }
  return visible
}

/**
 * A database server of its own (the PostgreSQL line): its environment for Stipple, and the CPU
 * seconds its processes have used so far, counted beside Stipple's.
 */
export interface DatabaseServer {
  env: Record<string, string>
  cpuSeconds(): number | null
}

export async function loadServer(
  dataDir: string,
  people: BenchPeople,
  httpWorkers: number,
  mix: LoadMix,
  database?: DatabaseServer,
) {
  const server = await startServer(dataDir, httpWorkers, database?.env)
  try {
    const visible = await probe(server.url, people)
    await wrkLoad(server.url, mix, 3) // warm-up
    const cpuBefore = cpuSeconds(server.pid)
    const dbCpuBefore = database?.cpuSeconds() ?? null
    const w = await wrkLoad(server.url, mix, DURATION_S)
    const cpuAfter = cpuSeconds(server.pid)
    const dbCpuAfter = database?.cpuSeconds() ?? null
    const perRequest = (before: number | null, after: number | null) =>
      before === null || after === null ? null : ((after - before) * 1e6) / w.requests
    const cpuUs = perRequest(cpuBefore, cpuAfter)
    return { visible, httpWorkers, ...w, cpuUs, dbCpuUs: perRequest(dbCpuBefore, dbCpuAfter) }
  } finally {
    await server.stop()
  }
}

type LoadResult = Awaited<ReturnType<typeof loadServer>>

const ms = (us: number) => (us >= 10_000 ? (us / 1000).toFixed(0) : (us / 1000).toFixed(1))

/** One printed line: latency, throughput, server CPU and the cache's share. */
export function line(r: LoadResult) {
  const answered = r.cached + r.fresh
  const parts = [
    `p50 ${ms(r.p50)} ms`,
    `p95 ${ms(r.p95)} ms`,
    `p99 ${ms(r.p99)} ms`,
    `${Math.round(r.requests / (r.durationUs / 1e6))} req/s`,
    `CPU ${r.cpuUs === null ? '?' : (r.cpuUs / 1000).toFixed(2)} ms/req`,
    ...(r.dbCpuUs === null ? [] : [`database server CPU ${(r.dbCpuUs / 1000).toFixed(2)} ms/req`]),
    `${answered ? Math.round((100 * r.cached) / answered) : 0} % from cache`,
    `db ${r.fresh ? (r.dbUs / r.fresh / 1000).toFixed(2) : '0'} ms/uncached`,
    `${r.httpWorkers} process${r.httpWorkers > 1 ? 'es' : ''}`,
  ]
  if (r.errors || r.non2xx)
    parts.push(`${r.errors} socket errors, ${r.non2xx} non-2xx ${JSON.stringify(r.refused)}`)
  return parts.join(' · ')
}

export async function benchDatasetList() {
  const workers = Number(process.env.BENCH_HTTP_WORKERS ?? availableParallelism())
  const small = await withDatasets(10_000, async (dir, people) => {
    const mixed = await loadServer(dir, people, workers, mixedLoad(people))
    const mixedOne = await loadServer(dir, people, 1, mixedLoad(people))
    const repeated = await loadServer(dir, people, workers, repeatedLoad(people))
    return { mixed, mixedOne, repeated }
  })
  const large =
    process.env.BENCH_LARGE === '0'
      ? null
      : await withDatasets(100_000, (dir, people) =>
          loadServer(dir, people, workers, mixedLoad(people)),
        )
  return {
    connections: CONNECTIONS,
    durationS: DURATION_S,
    visible10k: JSON.stringify(small.mixed.visible),
    'mixed 10k': line(small.mixed),
    'mixed 10k, 1 proc': line(small.mixedOne),
    'repeated 10k': line(small.repeated),
    ...(large ? { 'mixed 100k': line(large), visible100k: JSON.stringify(large.visible) } : {}),
    targets: 'mixed 10k: p95 < 30 ms, CPU < 0.5 ms/req; mixed 100k: p95 < 50 ms',
  }
}
