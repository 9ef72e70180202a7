/**
 * Localization-table ingest of the 10-million-row reference table (../shared/bench/gen_locs.py,
 * cached under the OS temp dir), in a child process for its peak RSS, against pandas' read_csv
 * on the same file in the same run (../shared/bench/reference.py). Targets: ingest ≤ 0.5 × the
 * read_csv time, peak RSS < 1 GB.
 */
import { execFile } from 'node:child_process'
import { rmSync, statSync } from 'node:fs'
import { referenceTable, referenceTimes } from './reference-pipeline'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { promisify } from 'node:util'

const run = promisify(execFile)
const repo = fileURLToPath(new URL('../..', import.meta.url))
const MAX_BUFFER = 64 << 20

interface ChildResult {
  seconds: number
  cpuSeconds: number
  warmSeconds: number
  peakRssMB: number
  rowsAccepted: number
  rowsRejected: number
  outputBytes: number
  recordBatches: number
  phaseSeconds: Record<string, number>
}

async function ingestInChild(table: string, output: string): Promise<ChildResult> {
  const args = ['--import', 'tsx', join(repo, 'tests', 'bench', 'ingest-child.ts'), table, output]
  const { stdout } = await run(process.execPath, args, { cwd: repo, maxBuffer: MAX_BUFFER })
  const line = stdout.split('\n').find((l) => l.startsWith('RESULT '))
  if (!line) throw new Error(`the ingest child printed no result:\n${stdout}`)
  return JSON.parse(line.slice('RESULT '.length)) as ChildResult
}

export async function benchIngest(): Promise<Record<string, unknown>> {
  const table = await referenceTable()
  const fileMB = statSync(table).size / 1e6
  const output = join(tmpdir(), `stipple-bench-ingest-${process.pid}.arrow`)
  try {
    const ingest = await ingestInChild(table, output)
    const readCsv = (await referenceTimes(table)).read_csv!
    const ratio = ingest.seconds / readCsv
    return {
      rows: ingest.rowsAccepted,
      rejectedRows: ingest.rowsRejected,
      fileMB: round(fileMB, 1),
      ingestSeconds: round(ingest.seconds, 3),
      ingestCpuSeconds: round(ingest.cpuSeconds, 2),
      warmIngestSeconds: round(ingest.warmSeconds, 3),
      phases: Object.entries(ingest.phaseSeconds)
        .map(([k, v]) => `${k} ${round(v, 2)}`)
        .join(', '),
      rowsPerSecond: Math.round(ingest.rowsAccepted / ingest.seconds),
      mbPerSecond: round(fileMB / ingest.seconds, 1),
      peakRssMB: Math.round(ingest.peakRssMB),
      outputMB: round(ingest.outputBytes / 1e6, 1),
      recordBatches: ingest.recordBatches,
      pandasReadCsvSeconds: round(readCsv, 3),
      ratioToReadCsv: round(ratio, 3),
      targetRatio: 0.5,
      targetPeakRssMB: 1000,
      targetsMet: ratio <= 0.5 && ingest.peakRssMB < 1000,
    }
  } finally {
    for (const path of [output, `${output}.warm`]) {
      rmSync(path, { force: true })
      rmSync(`${path}.index.json`, { force: true })
    }
  }
}

function round(value: number, digits: number) {
  return Math.round(value * 10 ** digits) / 10 ** digits
}
