/** The numpy/pandas reference pipeline beside the repository (../shared/bench), and its table. */
import { execFile } from 'node:child_process'
import { existsSync, mkdirSync, renameSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { promisify } from 'node:util'

const run = promisify(execFile)
const repo = fileURLToPath(new URL('../..', import.meta.url))
/** The reference scripts: STIPPLE_SHARED_DIR, else ../shared beside the repository. */
const shared = process.env.STIPPLE_SHARED_DIR ?? join(repo, '..', 'shared')
const ROWS = Number(process.env.BENCH_INGEST_ROWS ?? 10_000_000)
const MAX_BUFFER = 64 << 20

/** The reference table of ROWS rows (gen_locs.py, fixed seed), made once under the temp dir. */
export async function referenceTable(): Promise<string> {
  const dir = join(tmpdir(), 'stipple-bench')
  const path = join(dir, `locs-${ROWS}.csv`)
  if (existsSync(path)) return path
  mkdirSync(dir, { recursive: true })
  await run(join(shared, 'bench', 'gen_locs.py'), [String(ROWS), `${path}.part`], {
    maxBuffer: MAX_BUFFER,
  })
  renameSync(`${path}.part`, path)
  return path
}

/** What the reference pipeline printed: seconds per step (read_csv, stats, …) and its statistics. */
export interface ReferenceRun {
  times: Record<string, number>
  stats: {
    count: number
    frames: number
    frame_range: [number, number]
    median_photons: number
    median_uncertainty_nm: number
    bbox_nm: [number, number, number, number]
  }
}

/** Runs the reference pipeline on the table. */
export async function referenceRun(table: string): Promise<ReferenceRun> {
  const { stdout } = await run(join(shared, 'bench', 'reference.py'), [table], {
    maxBuffer: MAX_BUFFER,
  })
  const line = stdout.split('\n').find((l) => l.startsWith('JSON '))
  if (!line) throw new Error(`reference.py printed no JSON line:\n${stdout}`)
  const printed = JSON.parse(line.slice('JSON '.length)) as {
    times_s: ReferenceRun['times']
    stats: ReferenceRun['stats']
  }
  return { times: printed.times_s, stats: printed.stats }
}
