/**
 * What the server benchmarks share: a database seeded with bench datasets and people, and Stipple
 * started as it runs in production (its own process, `WEB_CONCURRENCY` HTTP processes).
 */
import { spawn } from 'node:child_process'
import { mkdtempSync, readFileSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { loadConfig } from '@server/config'
import { openDatabase } from '@server/db'
import { seedDatasets, type BenchPeople } from './seed-datasets'

export async function startServer(
  dataDir: string,
  httpWorkers: number,
  env: Record<string, string> = {},
) {
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
        ...env,
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
export function cpuSeconds(pid: number | undefined): number | null {
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

/** A database with `count` bench datasets, for as long as `use` runs. */
export async function withDatasets<T>(
  count: number,
  use: (dir: string, people: BenchPeople) => Promise<T>,
) {
  const dataDir = mkdtempSync(join(tmpdir(), 'stipple-bench-list-'))
  try {
    const orm = await openDatabase(loadConfig({ DATA_DIR: dataDir, LOG_LEVEL: 'silent' }).dbPath)
    const people = await seedDatasets(orm.em.fork(), count)
    await orm.close()
    return await use(dataDir, people)
  } finally {
    rmSync(dataDir, { recursive: true, force: true })
  }
}
