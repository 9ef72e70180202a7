/**
 * `ingestLocalizationTable`: a deposited localization table (text, optionally gzip) to a typed,
 * tile-ordered Apache Arrow file with its index, and a report of what was kept and what was not.
 * It streams: the text passes through in chunks, and only the parsed columns are held (about 4
 * bytes per value). Chunks are parsed on worker threads, one per core, for tables above a few MB.
 */
import { availableParallelism } from 'node:os'
import { stat } from 'node:fs/promises'
import { columnMappingSchema } from '@shared/schemas/localization-mapping.schema'
import { BufferPool } from './buffer.pool'
import { settleFrameBase } from './frame-base'
import { readRecordChunks } from './chunk.reader'
import { processChunks } from './chunk.dispatcher'
import type { GridRule } from './chunk.processor'
import { ChunkSpill, isSpilled, type HeldChunk } from './chunk.spill'
import { InlineBackend } from './ingest.backends'
import { addUp, boundsOf, type IngestReport, type Totals } from './ingest-report'
import { buildParsePlan, slotOf } from './parse-plan'
import { acquireParseWorkers } from './parse-worker.pool'
import { PARSED_SHARE, writeOutput, type Run } from './output.writer'
import { BYTES_PER_VALUE } from './output.columns'
import { buildReport } from './report.builder'
import { sniffTable } from './sniff.service'
import { TableFormatError } from './table-format.types'
import type { IngestLimits, IngestOptions } from './ingest-options'
import { planGrid, type Bounds, type TileGrid } from '../store/tile.grid'

const INLINE_BELOW_BYTES = 8 << 20
/**
 * The first chunk is processed on this thread and its rows fix the tile grid; the workers wait
 * for the grid, so it is kept small (tens of thousands of rows still span the field).
 */
const FIRST_CHUNK_BYTES = 1 << 20
/**
 * Parsed columns held in memory before the rest spill to disk: a 10-million-row table (~280 MB)
 * stays in memory; beyond, peak memory stays near this plus the workers' chunks.
 */
const MEMORY_BUDGET_BYTES = 512 << 20

/** Stops the ingest once the rows, or the store they need, pass the limits. */
function rowLimit(plan: ReturnType<typeof buildParsePlan>, limits: IngestLimits = {}) {
  const bytesPerRow = plan.slots.reduce((n, slot) => n + BYTES_PER_VALUE[slot.storage], 0)
  const gib = (bytes: number) => `${(bytes / 1024 ** 3).toFixed(2)} GiB`
  return (rows: number) => {
    if (limits.maxRows !== undefined && rows > limits.maxRows)
      throw new TableFormatError(
        'too_many_rows',
        `The table has more than ${limits.maxRows.toLocaleString('en')} rows, the most one table may have here; ask a site admin to raise INGEST_MAX_ROWS.`,
      )
    if (limits.maxOutputBytes !== undefined && rows * bytesPerRow > limits.maxOutputBytes)
      throw new TableFormatError(
        'too_large',
        `Converted, the table would need more than ${gib(limits.maxOutputBytes)}, what is left of the project's quota; ask a site admin for more space.`,
      )
  }
}

export async function ingestLocalizationTable(options: IngestOptions): Promise<IngestReport> {
  const clock = phaseClock()
  const mapping = columnMappingSchema.parse(options.mapping)
  const sniff = await sniffTable(options.sourcePath, options.format)
  const { size } = await stat(options.sourcePath)
  const plan = buildParsePlan(mapping, sniff, sniff.averageRowBytes)
  const run: Run = { options, sniff, plan, progress: monotonic(options.onProgress), lap: clock.lap }
  const workers = acquireParseWorkers(options.tuning?.workers ?? defaultWorkers(size), plan)
  const inline = new InlineBackend(plan)
  const budget = options.tuning?.memoryBudgetBytes ?? MEMORY_BUDGET_BYTES
  const spill = new ChunkSpill(`${options.outputPath}.spill`, budget)
  try {
    clock.lap('sniff')
    const chunkBytes = options.tuning?.chunkBytes ?? chunkSizeFor(size)
    const buffers = new BufferPool()
    const limits = options.limits ?? {}
    const chunks = readRecordChunks(
      options.sourcePath,
      sniff,
      chunkBytes,
      buffers,
      limits.maxExpansion,
      Math.min(chunkBytes, FIRST_CHUNK_BYTES),
    )
    const gridFor = (readFraction: number) => gridRule(readFraction, options.tuning?.rowsPerTile)
    const onProcessed = (fraction: number) => run.progress(fraction * PARSED_SHARE)
    const checkRows = rowLimit(plan, limits)
    const keep = spill.keep.bind(spill)
    const dispatch = { inline, workers, buffers, gridFor, onProcessed, checkRows, keep }
    const { processed, grid } = await processChunks(chunks, dispatch)
    const totals = addUp(
      processed.map((p) => p.summary),
      plan,
      sniff.dataStartLine,
    )
    clock.lap('parse')
    const grouped = processed.flatMap((p) => (p.grouped ? [p.grouped] : []))
    const layout = await fitGrid(run, totals, grid, grouped, inline, spill)
    run.plan = settleFrameBase(plan, totals, layout.chunks)
    await spill.settled()
    const outcome = await writeOutput(run, totals, layout.grid, layout.chunks, spill)
    return buildReport(options.outputPath, outcome, clock.phases)
  } finally {
    for (const worker of workers) worker.release()
    await spill.close()
  }
}

/**
 * One worker per core, up to 4. (This thread parsing alongside one worker was slower on two
 * cores: while it parses, it neither reads nor feeds the worker.)
 */
function defaultWorkers(size: number) {
  return size < INLINE_BELOW_BYTES ? 0 : Math.min(4, availableParallelism())
}

/** About 1/64 of the file (progress every ~1.5 %), between 64 KiB and 16 MiB. */
function chunkSizeFor(size: number) {
  return Math.min(16 << 20, Math.max(64 << 10, Math.ceil(size / 64)))
}

const NO_EXTENT: Bounds = { xMin: 0, xMax: 0, yMin: 0, yMax: 0 }

/**
 * The grid is laid over the bounds of the first chunk with rows, 1 % wider on each side, and
 * sized for the rows the whole file should hold at that density. Localization tables run in frame
 * order and early frames span the field, so this is the field; rows outside it go to the edge
 * tiles, whose recorded bounds then include them (queries stay exact).
 */
function gridRule(readFraction: number, rowsPerTile: number | undefined): GridRule {
  return (x, y, rows): TileGrid => {
    const padX = (x.max - x.min) * 0.01
    const padY = (y.max - y.min) * 0.01
    const extent = {
      xMin: x.min - padX,
      xMax: x.max + padX,
      yMin: y.min - padY,
      yMax: y.max + padY,
    }
    return planGrid(extent, Math.round(rows / Math.max(readFraction, 1e-6)), rowsPerTile)
  }
}

/** Share of rows outside the grid laid over the first rows beyond which the table is regrouped. */
const MAX_OUTSIDE = 0.05

/**
 * When the first rows did not span the field (a table sorted by position, say), the edge tiles
 * hold too much: then the chunks are regrouped here on a grid over the bounds of all rows.
 */
async function fitGrid(
  run: Run,
  totals: Totals,
  grid: TileGrid | null,
  chunks: HeldChunk[],
  inline: InlineBackend,
  spill: ChunkSpill,
) {
  const outside = totals.outside
  if (grid && outside <= MAX_OUTSIDE * totals.rows) return { grid, chunks }
  const x = totals.stats[slotOf(run.plan, 'x')]
  const y = totals.stats[slotOf(run.plan, 'y')]
  const bounds = boundsOf(x, y) ?? NO_EXTENT
  const fitted = planGrid(bounds, totals.rows, run.options.tuning?.rowsPerTile)
  const regrouped: HeldChunk[] = []
  for (const chunk of chunks) {
    if (!isSpilled(chunk)) regrouped.push(inline.regroup(chunk, fitted))
    else regrouped.push(spill.keep(inline.regroup(await spill.load(chunk), fitted)))
  }
  return { grid: fitted, chunks: regrouped }
}

function monotonic(report: ((fraction: number) => void) | undefined) {
  let last = -1
  return (fraction: number) => {
    if (!report || fraction <= last) return
    last = fraction
    report(Math.min(1, fraction))
  }
}

function phaseClock() {
  const phases: Record<string, number> = {}
  let mark = performance.now()
  const lap = (phase: string) => {
    const now = performance.now()
    phases[phase] = (now - mark) / 1000
    mark = now
  }
  return { phases, lap }
}
