/**
 * `ingestLocalizationTable`: a deposited localization table (text, optionally gzip) to a typed,
 * tile-ordered Apache Arrow file with its index, and a report of what was kept and what was not.
 * It streams: the text passes through in chunks, and only the parsed columns are held (about 4
 * bytes per value). Chunks are parsed on worker threads, one per core, for tables above a few MB.
 */
import { availableParallelism } from 'node:os'
import { stat } from 'node:fs/promises'
import {
  columnMappingSchema,
  type ColumnMappingInput,
} from '@shared/schemas/localization-mapping.schema'
import { readRecordChunks } from './chunk.reader'
import { parseChunks } from './chunk.dispatcher'
import { InlineBackend, WorkerBackend, type ParseBackend } from './ingest.backends'
import {
  addUp,
  boundsOf,
  columnReports,
  rejectedSection,
  rowCounts,
  type IngestReport,
  type Totals,
} from './ingest-report'
import { buildParsePlan, type ParsePlan } from './parse-plan'
import { sniffTable } from './sniff.service'
import type { FormatOverrides } from './table.sniffer'
import type { TableSniff } from './table-format.types'
import { planGrid, type Bounds, type TileGrid } from './tile.grid'
import { buildTileIndex, indexPathFor, writeTileIndex } from './tile.index'
import { outputColumns, writeTiledArrow } from './tiled-arrow.writer'

export interface IngestOptions {
  sourcePath: string
  /** The Arrow file to write; its index goes to `<outputPath>.index.json`. */
  outputPath: string
  mapping: ColumnMappingInput
  /** Called with 0…1, at least every ~2 % of the input bytes. */
  onProgress?: (fraction: number) => void
  /** What the depositor declared, over what the sniffer finds. */
  format?: FormatOverrides
  /** For tests and benchmarks: worker count (0 = this thread), chunk size, rows per tile. */
  tuning?: { workers?: number; chunkBytes?: number; rowsPerTile?: number }
}

const INLINE_BELOW_BYTES = 8 << 20
const PARSE_SHARE = 0.85
const GROUP_SHARE = 0.05

export async function ingestLocalizationTable(options: IngestOptions): Promise<IngestReport> {
  const started = performance.now()
  const mapping = columnMappingSchema.parse(options.mapping)
  const sniff = await sniffTable(options.sourcePath, options.format)
  const { size } = await stat(options.sourcePath)
  const plan = buildParsePlan(mapping, sniff, sniff.averageRowBytes)
  const progress = monotonic(options.onProgress)
  const backends = startBackends(plan, options.tuning?.workers ?? defaultWorkers(size))
  try {
    const chunkBytes = options.tuning?.chunkBytes ?? chunkSizeFor(size)
    const chunks = readRecordChunks(options.sourcePath, sniff, chunkBytes)
    console.time('parse')
    const summaries = await parseChunks(chunks, backends, (f) => progress(f * PARSE_SHARE))
    console.timeEnd('parse')
    const totals = addUp(summaries, plan, sniff.dataStartLine)
    const bounds = boundsOf(totals.stats[slotOf(plan, 'x')], totals.stats[slotOf(plan, 'y')])
    const grid = planGrid(
      bounds ?? { xMin: 0, xMax: 0, yMin: 0, yMax: 0 },
      totals.rows,
      options.tuning?.rowsPerTile,
    )
    console.time('group')
    const grouped = await groupAll(backends, grid)
    console.timeEnd('group')
    console.time('write')
    progress(PARSE_SHARE + GROUP_SHARE)
    const output = outputColumns(plan, totals.stats, new Map([['stipple.layout', 'xy-tiles/1']]))
    const written = await writeTiledArrow(
      options.outputPath,
      output,
      grid,
      grouped,
      (done, total) =>
        progress(PARSE_SHARE + GROUP_SHARE + (1 - PARSE_SHARE - GROUP_SHARE) * (done / total)),
    )
    console.timeEnd('write')
    await writeTileIndex(
      options.outputPath,
      buildTileIndex(options.outputPath, written.schema, grid, written.tiles, bounds),
    )
    progress(1)
    const types = written.schema.fields.map((f) => String(f.type))
    const report = {
      sniff,
      plan,
      totals,
      bounds,
      grid,
      types,
      bytes: written.bytes,
      batches: written.tiles.length,
    }
    return buildReport(options, report, (performance.now() - started) / 1000)
  } finally {
    await Promise.all(backends.map((b) => b.close()))
  }
}

function startBackends(plan: ParsePlan, workers: number): ParseBackend[] {
  if (workers <= 0) return [new InlineBackend(plan)]
  return Array.from({ length: workers }, () => new WorkerBackend(plan))
}

function defaultWorkers(size: number) {
  return size < INLINE_BELOW_BYTES ? 0 : Math.min(2, availableParallelism())
}

/** About 1/64 of the file (progress every ~1.5 %), between 64 KiB and 16 MiB. */
function chunkSizeFor(size: number) {
  return Math.min(16 << 20, Math.max(64 << 10, Math.ceil(size / 64)))
}

async function groupAll(backends: ParseBackend[], grid: TileGrid) {
  const results = await Promise.all(backends.map((b) => b.group(grid)))
  const tileBounds = results[0]!.tileBounds
  for (const other of results.slice(1)) {
    for (let i = 0; i < tileBounds.length; i += 2) {
      tileBounds[i] = Math.min(tileBounds[i]!, other.tileBounds[i]!)
      tileBounds[i + 1] = Math.max(tileBounds[i + 1]!, other.tileBounds[i + 1]!)
    }
  }
  const chunks = results.flatMap((r) => r.chunks).sort((a, b) => a.seq - b.seq)
  return { chunks, tileBounds }
}

function slotOf(plan: ParsePlan, role: 'x' | 'y' | 'frame') {
  return plan.slots.findIndex((s) => s.role === role)
}

function monotonic(report: ((fraction: number) => void) | undefined) {
  let last = -1
  return (fraction: number) => {
    if (!report || fraction <= last) return
    last = fraction
    report(Math.min(1, fraction))
  }
}

interface Outcome {
  sniff: TableSniff
  plan: ParsePlan
  totals: Totals
  bounds: Bounds | null
  grid: TileGrid
  types: string[]
  bytes: number
  batches: number
}

function buildReport(options: IngestOptions, o: Outcome, seconds: number): IngestReport {
  const {
    dataOffset: _offset,
    sampleRows: _rows,
    averageRowBytes: _bytes,
    problems: _p,
    ...format
  } = o.sniff
  const frame = o.totals.stats[slotOf(o.plan, 'frame')]
  const sourceBase = (o.plan.slots[slotOf(o.plan, 'frame')]?.offset ?? 1) === 0 ? 0 : 1
  return {
    ...rowCounts(o.totals),
    rejected: rejectedSection(o.totals.rejections),
    columns: columnReports(o.plan, o.totals.stats, o.types),
    boundsNm: o.bounds,
    frames: frame && frame.count > 0 ? { first: frame.min, last: frame.max, sourceBase } : null,
    aduColumns: o.plan.slots.filter((s) => s.sourceUnit === 'adu').map((s) => s.sourceName),
    problems: problemsOf(o),
    format,
    output: {
      arrowPath: options.outputPath,
      indexPath: indexPathFor(options.outputPath),
      bytes: o.bytes,
      layout: 'one record batch per non-empty tile of a square grid over the x/y bounds, row-major',
      grid: o.grid,
      recordBatches: o.batches,
    },
    seconds,
  }
}

function problemsOf(o: Outcome): string[] {
  const problems = [...o.sniff.problems]
  const widest = Math.max(...o.plan.slots.map((s) => s.field + 1))
  if (widest > o.sniff.columnCount) {
    problems.push(
      `The mapping uses column ${widest}, but the lines have ${o.sniff.columnCount} field(s)`,
    )
  }
  for (const slot of o.plan.slots.filter((s) => s.sourceUnit === 'adu')) {
    problems.push(
      `"${slot.sourceName}" is in ADU and is stored as given: converting to photons needs the ` +
        'camera offset and conversion factor (e⁻/ADU)',
    )
  }
  const frameZero = o.totals.rejections.negative_frame?.count ?? 0
  if (frameZero > 0 && o.plan.slots.some((s) => s.role === 'frame' && s.offset === 1)) {
    problems.push(`${frameZero} row(s) have frame 0 while frames are declared to count from 1`)
  }
  if (o.totals.rows === 0) problems.push('No row was accepted')
  return problems
}
