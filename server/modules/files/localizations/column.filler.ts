/**
 * Fills the holes of the Arrow skeleton column by column. For each column the threads holding the
 * chunks scatter their rows into a shared buffer in tile order (counting the column's statistics
 * on the way); while they scatter the next column into a second buffer, each tile's slice of this
 * one is written at its offset. Two columns are in memory besides the parsed chunks.
 */
import type { FileHandle } from 'node:fs/promises'
import type { ArrowSkeleton } from './arrow-skeleton.writer'
import type { ColumnStats, Scattered } from './chunk.store'
import type { ParseBackend } from './ingest.backends'
import { BYTES_PER_VALUE, viewOf, type OutputArray, type OutputKind } from './output.columns'

/** A non-empty tile: one record batch. */
export interface TileBatch {
  key: number
  rowStart: number
  rowCount: number
}

export interface FillJob {
  file: FileHandle
  skeleton: ArrowSkeleton
  batches: TileBatch[]
  rows: number
  /** Tiles of the grid (empty ones included). */
  tiles: number
  kinds: OutputKind[]
  chunkOffsets: Map<number, Uint32Array>
  backends: ParseBackend[]
  xSlot: number
  ySlot: number
  onColumn: (done: number, all: number) => void
}

export interface Filled {
  /** xMin, xMax, yMin, yMax of each batch's rows. */
  batchBounds: Float64Array
  /** Statistics of every column, from the written values. */
  stats: ColumnStats[]
}

export async function fillColumns(job: FillJob): Promise<Filled> {
  const width = Math.max(1, ...job.kinds.map((k) => BYTES_PER_VALUE[k]))
  const buffers = [0, 1].map(() => new SharedArrayBuffer(Math.max(1, job.rows * width)))
  const writing: Promise<void>[] = [Promise.resolve(), Promise.resolve()]
  const filled: Filled = { batchBounds: new Float64Array(job.batches.length * 4), stats: [] }
  const scatter = (slot: number) => {
    const buffer = buffers[slot % 2]!
    const request = {
      slot,
      kind: job.kinds[slot]!,
      buffer,
      offsets: job.chunkOffsets,
      tiles: job.tiles,
    }
    return Promise.all(job.backends.map((b) => b.scatter(request)))
  }
  let scattering = scatter(0)
  for (let slot = 0; slot < job.kinds.length; slot++) {
    const results = await scattering
    const view = viewOf(job.kinds[slot]!, buffers[slot % 2]!, job.rows)
    const written = writeColumn(job.file, view, job.batches, job.skeleton.holes[slot]!)
    written.catch(() => undefined) // awaited below; this only keeps Node from calling it unhandled
    writing[slot % 2] = written
    if (slot + 1 < job.kinds.length) {
      await writing[(slot + 1) % 2]
      scattering = scatter(slot + 1)
    }
    summarize(job, slot, results, filled)
    job.onColumn(slot + 1, job.kinds.length)
  }
  await Promise.all(writing)
  return filled
}

async function writeColumn(
  file: FileHandle,
  view: OutputArray,
  batches: TileBatch[],
  holes: number[],
) {
  const size = view.BYTES_PER_ELEMENT
  await Promise.all(
    batches.map((batch, b) => {
      const bytes = new Uint8Array(view.buffer, batch.rowStart * size, batch.rowCount * size)
      return file.write(bytes, 0, bytes.length, holes[b]!)
    }),
  )
}

/** Adds up what each thread counted while it scattered the column. */
function summarize(job: FillJob, slot: number, results: Scattered[], filled: Filled) {
  const stats = { count: 0, missing: 0, min: Infinity, max: -Infinity }
  for (const { stats: s } of results) {
    stats.count += s.count
    stats.missing += s.missing
    stats.min = Math.min(stats.min, s.min)
    stats.max = Math.max(stats.max, s.max)
  }
  filled.stats[slot] = stats
  const at = slot === job.xSlot ? 0 : slot === job.ySlot ? 2 : -1
  if (at < 0) return
  job.batches.forEach((batch, b) => {
    const ranges = results.map((r) => r.ranges!)
    filled.batchBounds[b * 4 + at] = Math.min(...ranges.map((r) => r[batch.key * 2]!))
    filled.batchBounds[b * 4 + at + 1] = Math.max(...ranges.map((r) => r[batch.key * 2 + 1]!))
  })
}
