/**
 * Localization-table ingest of the 10-million-row reference table (../shared/bench/gen_locs.py,
 * cached under the OS temp dir), in a child process for its peak RSS, beside the readers people
 * would use instead, each on the same file in the same run and in a process of its own
 * (csv_readers.py): pandas read_csv, pyarrow csv.read_csv and polars read_csv (skipped with a
 * note where not installed). Stipple's cold ingest starts its parse workers; the warm one runs
 * again in the same process, as in a running server. Targets (issue #13): cold ≤ 1.0 × and warm
 * ≤ 0.7 × the faster of pyarrow and polars, peak RSS < 600 MB.
 */
import { execFile } from 'node:child_process'
import { createWriteStream, existsSync, readFileSync, renameSync, rmSync, statSync } from 'node:fs'
import { once } from 'node:events'
import { referenceTable } from './reference-pipeline'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { promisify } from 'node:util'

const run = promisify(execFile)
const repo = fileURLToPath(new URL('../..', import.meta.url))
const MAX_BUFFER = 64 << 20
const READERS = ['pandas', 'pyarrow', 'polars'] as const

interface ChildResult {
  seconds: number
  cpuSeconds: number
  warmSeconds: number
  warmCpuSeconds: number
  peakRssMB: number
  rowsAccepted: number
  rowsRejected: number
  outputBytes: number
  recordBatches: number
  spilledBytes: number
  phaseSeconds: Record<string, number>
}

type ReaderResult =
  | { reader: string; seconds: number; cpu_seconds: number; peak_rss_mb: number; rows: number }
  | { reader: string; skipped: string }

async function ingestInChild(table: string, output: string, once = false): Promise<ChildResult> {
  const child = join(repo, 'tests', 'bench', 'ingest-child.ts')
  const args = ['--import', 'tsx', child, table, output, ...(once ? ['--once'] : [])]
  const { stdout } = await run(process.execPath, args, { cwd: repo, maxBuffer: MAX_BUFFER })
  const line = stdout.split('\n').find((l) => l.startsWith('RESULT '))
  if (!line) throw new Error(`the ingest child printed no result:\n${stdout}`)
  return JSON.parse(line.slice('RESULT '.length)) as ChildResult
}

async function readWith(reader: string, table: string): Promise<ReaderResult> {
  const script = join(repo, 'tests', 'bench', 'csv_readers.py')
  try {
    const { stdout } = await run('python3', [script, reader, table], { maxBuffer: MAX_BUFFER })
    const line = stdout.split('\n').find((l) => l.startsWith('JSON '))
    if (!line) return { reader, skipped: `printed no result: ${stdout.slice(0, 200)}` }
    return JSON.parse(line.slice('JSON '.length)) as ReaderResult
  } catch (error) {
    return { reader, skipped: `python3 failed (${(error as Error).message.split('\n')[0]})` }
  }
}

export async function benchIngest(): Promise<Record<string, unknown>> {
  const table = await referenceTable()
  const fileMB = statSync(table).size / 1e6
  const output = join(tmpdir(), `stipple-bench-ingest-${process.pid}.arrow`)
  try {
    const ingest = await ingestInChild(table, output)
    const readers: ReaderResult[] = []
    for (const reader of READERS) readers.push(await readWith(reader, table))
    const timed = readers.filter((r) => 'seconds' in r)
    const fastest = timed
      .filter((r) => r.reader !== 'pandas')
      .reduce<(typeof timed)[number] | null>((a, b) => (!a || b.seconds < a.seconds ? b : a), null)
    const figures: Record<string, unknown> = {
      rows: ingest.rowsAccepted,
      rejectedRows: ingest.rowsRejected,
      fileMB: round(fileMB, 1),
      coldSeconds: round(ingest.seconds, 3),
      coldMBPerSecondPerCore: round(fileMB / ingest.cpuSeconds, 1),
      warmSeconds: round(ingest.warmSeconds, 3),
      warmMBPerSecondPerCore: round(fileMB / ingest.warmCpuSeconds, 1),
      peakRssMB: Math.round(ingest.peakRssMB),
      phases: Object.entries(ingest.phaseSeconds)
        .map(([k, v]) => `${k} ${round(v, 2)}`)
        .join(', '),
      outputMB: round(ingest.outputBytes / 1e6, 1),
    }
    for (const r of readers) {
      if (!('seconds' in r)) {
        figures[r.reader] = `skipped: ${r.skipped}`
        continue
      }
      figures[r.reader] =
        `${round(r.seconds, 3)} s, ${round(fileMB / r.cpu_seconds, 1)} MB/s per core, ` +
        `peak RSS ${Math.round(r.peak_rss_mb)} MB, ${r.rows} rows; Stipple cold/this ` +
        `${round(ingest.seconds / r.seconds, 3)}, warm/this ${round(ingest.warmSeconds / r.seconds, 3)}`
    }
    if (fastest) {
      const cold = ingest.seconds / fastest.seconds
      const warm = ingest.warmSeconds / fastest.seconds
      Object.assign(figures, {
        fasterOfArrowPolars: fastest.reader,
        coldRatio: round(cold, 3),
        warmRatio: round(warm, 3),
        targets: 'cold ≤ 1.0, warm ≤ 0.7, peak RSS < 600 MB',
        targetsMet: cold <= 1 && warm <= 0.7 && ingest.peakRssMB < 600,
      })
    } else figures.targets = 'not judged: neither pyarrow nor polars ran'
    return figures
  } finally {
    for (const path of [output, `${output}.warm`]) {
      rmSync(path, { force: true })
      rmSync(`${path}.index.json`, { force: true })
    }
  }
}

const LARGE_COPIES = 10

/**
 * The reference table ten times over (100 million rows, ~4.4 GB), each copy's frames after the
 * last copy's, so the table stays in frame order as acquisitions are. Cached beside it.
 */
async function largeTable(): Promise<string> {
  const source = await referenceTable()
  const path = source.replace(/\.csv$/, `-x${LARGE_COPIES}.csv`)
  if (existsSync(path)) return path
  const out = createWriteStream(`${path}.part`)
  const lines = readFileSync(source, 'latin1').split('\n')
  const header = lines.shift()!
  if (lines.at(-1) === '') lines.pop()
  const lastFrame = Number(lines.at(-1)!.slice(0, lines.at(-1)!.indexOf(',')))
  out.write(`${header}\n`)
  for (let copy = 0; copy < LARGE_COPIES; copy++) {
    const shift = copy * (lastFrame + 1)
    for (let start = 0; start < lines.length; start += 100_000) {
      const block = lines.slice(start, start + 100_000).map((line) => {
        const comma = line.indexOf(',')
        return `${Number(line.slice(0, comma)) + shift}${line.slice(comma)}`
      })
      if (!out.write(`${block.join('\n')}\n`)) await once(out, 'drain')
    }
  }
  await new Promise<void>((resolve, reject) =>
    out.end((e?: Error | null) => (e ? reject(e) : resolve())),
  )
  renameSync(`${path}.part`, path)
  return path
}

/**
 * `npm run bench -- ingest-large`: 100 million rows through the same ingest, once, in a child
 * process. The parsed table (~2.8 GB) exceeds the ingest's memory budget, so most of it goes
 * through the spill file. Target (issue #13): peak RSS under 1.5 GB.
 */
export async function benchIngestLarge(): Promise<Record<string, unknown>> {
  const table = await largeTable()
  const fileMB = statSync(table).size / 1e6
  const output = join(tmpdir(), `stipple-bench-ingest-large-${process.pid}.arrow`)
  try {
    const ingest = await ingestInChild(table, output, true)
    return {
      rows: ingest.rowsAccepted,
      fileMB: round(fileMB, 1),
      seconds: round(ingest.seconds, 2),
      MBPerSecondPerCore: round(fileMB / ingest.cpuSeconds, 1),
      peakRssMB: Math.round(ingest.peakRssMB),
      spilledMB: round(ingest.spilledBytes / 1e6, 1),
      outputMB: round(ingest.outputBytes / 1e6, 1),
      phases: Object.entries(ingest.phaseSeconds)
        .map(([k, v]) => `${k} ${round(v, 2)}`)
        .join(', '),
      target: 'peak RSS < 1500 MB',
      targetMet: ingest.peakRssMB < 1500,
    }
  } finally {
    rmSync(output, { force: true })
    rmSync(`${output}.index.json`, { force: true })
  }
}

function round(value: number, digits: number) {
  return Math.round(value * 10 ** digits) / 10 ** digits
}
