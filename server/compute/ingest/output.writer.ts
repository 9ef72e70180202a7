/**
 * After parsing: the record batches (one per non-empty tile), the Arrow file (skeleton, then the
 * batches' columns) and its index.
 */
import { open } from 'node:fs/promises'
import type { Schema } from 'apache-arrow'
import { writeArrowSkeleton } from '../store/arrow-skeleton.writer'
import { writeBatches, type TileBatch } from './batch.writer'
import type { TileLayout } from './chunk.processor'
import type { ChunkSpill, HeldChunk } from './chunk.spill'
import type { IngestOptions } from './ingest-options'
import { boundsOf, type Totals } from './ingest-report'
import { outputKinds, type OutputKind } from './output.columns'
import { outputSchema } from './output.schema'
import { slotOf, type ParsePlan } from './parse-plan'
import type { Outcome } from './report.builder'
import type { TableSniff } from './table-format.types'
import type { TileGrid } from '../store/tile.grid'
import { buildTileIndex, writeTileIndex, type WrittenTile } from '../store/tile.index'

/** Share of the progress bar for reading and parsing; the rest is writing. */
export const PARSED_SHARE = 0.9

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
  grid: TileGrid,
  chunks: HeldChunk[],
  spill: ChunkSpill,
): Promise<Outcome> {
  const { plan, options } = run
  const bounds = boundsOf(totals.stats[slotOf(plan, 'x')], totals.stats[slotOf(plan, 'y')])
  const batches = batchesOf(chunks, grid.columns * grid.rows)
  const kinds = outputKinds(plan, totals.stats)
  const schema = outputSchema(plan, kinds, new Map([['stipple.layout', 'xy-tiles/1']]))
  const bytes = await writeArrowFile(run, { schema, kinds, batches, chunks, spill })
  const tiles = writtenTiles(batches, chunks, grid)
  await writeTileIndex(
    options.outputPath,
    buildTileIndex(options.outputPath, schema, grid, tiles, bounds),
  )
  run.progress(1)
  run.lap('write')
  const types = schema.fields.map((f) => String(f.type))
  const spilledBytes = spill.spilledBytes
  return {
    sniff: run.sniff,
    plan,
    totals,
    bounds,
    grid,
    types,
    bytes,
    batches: tiles.length,
    spilledBytes,
  }
}

/** Non-empty tiles in key order, with their place in the tile-ordered table. */
function batchesOf(chunks: TileLayout[], tiles: number): TileBatch[] {
  const batches: TileBatch[] = []
  let rowStart = 0
  for (let key = 0; key < tiles; key++) {
    const rowCount = chunks.reduce((n, c) => n + c.tileStarts[key + 1]! - c.tileStarts[key]!, 0)
    if (rowCount === 0) continue
    batches.push({ key, rowStart, rowCount })
    rowStart += rowCount
  }
  return batches
}

interface ArrowJob {
  schema: Schema
  kinds: OutputKind[]
  batches: TileBatch[]
  chunks: HeldChunk[]
  spill: ChunkSpill
}

/**
 * The skeleton first (schema, batch headers, footer), then the columns into its holes. Through
 * the page cache on purpose: the quality report and the previews read the store right after
 * (written with O_DIRECT it took 0.4 s less from a cold start, but the report took 2–4 s more).
 */
async function writeArrowFile(run: Run, job: ArrowJob): Promise<number> {
  const file = await open(run.options.outputPath, 'w')
  try {
    const skeleton = await writeArrowSkeleton(
      file,
      job.schema,
      job.kinds,
      job.batches.map((b) => b.rowCount),
    )
    await writeBatches(file, skeleton, job, (done, all) =>
      run.progress(PARSED_SHARE + (1 - PARSED_SHARE) * (done / all)),
    )
    return skeleton.bytes
  } finally {
    await file.close()
  }
}

/** The index entry of each batch: its tile and the bounds of its rows over all chunks. */
function writtenTiles(batches: TileBatch[], chunks: TileLayout[], grid: TileGrid): WrittenTile[] {
  return batches.map((b, batch) => {
    const range = (pick: (c: TileLayout) => Float64Array, i: 0 | 1) =>
      (i === 0 ? Math.min : Math.max)(...chunks.map((c) => pick(c)[b.key * 2 + i]!))
    const boundsNm = {
      xMin: range((c) => c.xRanges, 0),
      xMax: range((c) => c.xRanges, 1),
      yMin: range((c) => c.yRanges, 0),
      yMax: range((c) => c.yRanges, 1),
    }
    const cell = { column: b.key % grid.columns, row: Math.floor(b.key / grid.columns) }
    return { ...b, ...cell, batch, boundsNm }
  })
}
