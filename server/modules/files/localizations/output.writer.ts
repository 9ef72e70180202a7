/**
 * After parsing: the tile grid over the bounds, the rows per tile, the Arrow file (skeleton, then
 * columns) and its index.
 */
import { open } from 'node:fs/promises'
import type { Schema } from 'apache-arrow'
import { writeArrowSkeleton } from './arrow-skeleton.writer'
import { fillColumns, type TileBatch } from './column.filler'
import type { ParseBackend } from './ingest.backends'
import type { IngestOptions } from './ingest.service'
import { boundsOf, type Totals } from './ingest-report'
import { outputKinds, type OutputKind } from './output.columns'
import { outputSchema } from './output.schema'
import { slotOf, type ParsePlan } from './parse-plan'
import type { Outcome } from './report.builder'
import type { TableSniff } from './table-format.types'
import { planGrid, type TileGrid } from './tile.grid'
import { buildTileIndex, writeTileIndex, type WrittenTile } from './tile.index'
import { layTiles, type TileLayout } from './tile.layout'

/** Share of the progress bar for reading and parsing; the rest is writing, column by column. */
export const PARSED_SHARE = 0.85

export interface Run {
  options: IngestOptions
  sniff: TableSniff
  plan: ParsePlan
  progress: (fraction: number) => void
  lap: (phase: string) => void
}

export async function writeOutput(
  run: Run,
  totals: Totals,
  backends: ParseBackend[],
): Promise<Outcome> {
  const { plan, options } = run
  const bounds = boundsOf(totals.stats[slotOf(plan, 'x')], totals.stats[slotOf(plan, 'y')])
  const extent = bounds ?? { xMin: 0, xMax: 0, yMin: 0, yMax: 0 }
  const grid = planGrid(extent, totals.rows, options.tuning?.rowsPerTile)
  const counts = await Promise.all(backends.map((b) => b.count(grid)))
  const layout = layTiles(counts.flat(), grid.columns * grid.rows)
  const kinds = outputKinds(plan, totals.stats)
  const schema = outputSchema(plan, kinds, new Map([['stipple.layout', 'xy-tiles/1']]))
  const batches = nonEmptyTiles(layout)
  const { filled, bytes } = await writeArrowFile(run, { schema, kinds, batches, layout, backends })
  const tiles = writtenTiles(batches, filled.batchBounds, grid)
  const index = buildTileIndex(options.outputPath, schema, grid, tiles, bounds)
  await writeTileIndex(options.outputPath, index)
  run.progress(1)
  run.lap('write')
  const types = schema.fields.map((f) => String(f.type))
  const counted = { ...totals, stats: filled.stats }
  return {
    sniff: run.sniff,
    plan,
    totals: counted,
    bounds,
    grid,
    types,
    bytes,
    batches: tiles.length,
  }
}

interface ArrowJob {
  schema: Schema
  kinds: OutputKind[]
  batches: TileBatch[]
  layout: TileLayout
  backends: ParseBackend[]
}

/** The skeleton first (schema, batch headers, footer), then the columns into its holes. */
async function writeArrowFile(run: Run, job: ArrowJob) {
  const file = await open(run.options.outputPath, 'w')
  try {
    const rows = job.batches.map((b) => b.rowCount)
    const skeleton = await writeArrowSkeleton(file, job.schema, job.kinds, rows)
    run.lap('tiles')
    const filled = await fillColumns({
      ...job,
      file,
      skeleton,
      rows: job.layout.rows,
      tiles: job.layout.tileStarts.length - 1,
      chunkOffsets: job.layout.chunkOffsets,
      xSlot: slotOf(run.plan, 'x'),
      ySlot: slotOf(run.plan, 'y'),
      onColumn: (done, all) => run.progress(PARSED_SHARE + (1 - PARSED_SHARE) * (done / all)),
    })
    return { filled, bytes: skeleton.bytes }
  } finally {
    await file.close()
  }
}

function nonEmptyTiles(layout: TileLayout): TileBatch[] {
  const batches: TileBatch[] = []
  for (let key = 0; key + 1 < layout.tileStarts.length; key++) {
    const rowStart = layout.tileStarts[key]!
    const rowCount = layout.tileStarts[key + 1]! - rowStart
    if (rowCount > 0) batches.push({ key, rowStart, rowCount })
  }
  return batches
}

function writtenTiles(batches: TileBatch[], bounds: Float64Array, grid: TileGrid): WrittenTile[] {
  return batches.map((b, batch) => {
    const at = batch * 4
    const boundsNm = {
      xMin: bounds[at]!,
      xMax: bounds[at + 1]!,
      yMin: bounds[at + 2]!,
      yMax: bounds[at + 3]!,
    }
    const cell = { column: b.key % grid.columns, row: Math.floor(b.key / grid.columns) }
    return { ...b, ...cell, batch, boundsNm }
  })
}
