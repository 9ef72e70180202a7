/**
 * Writes the column data of every record batch into the holes of the Arrow skeleton. A batch is
 * one tile; its rows sit in every chunk's slice for that tile (chunks in source order), so each
 * column of a batch is one gathered write of those slices: no copy of the table is made. When
 * chunks were spilled (chunk.spill.ts), runs of consecutive tiles are staged instead: one read per
 * chunk and column brings a run's rows back, then each tile is written from the staging buffer.
 */
import type { FileHandle } from 'node:fs/promises'
import type { ArrowSkeleton } from '../store/arrow-skeleton.writer'
import type { GroupedChunk } from './chunk.processor'
import { isSpilled, type ChunkSpill, type HeldChunk } from './chunk.spill'
import type { OutputKind } from './output.columns'
import type { StoredArray } from './stored-array'

/** A non-empty tile: one record batch. */
export interface TileBatch {
  key: number
  rowStart: number
  rowCount: number
}

const IN_FLIGHT = 8

interface BatchJob {
  batches: TileBatch[]
  chunks: HeldChunk[]
  kinds: OutputKind[]
  spill: ChunkSpill
}

export async function writeBatches(
  file: FileHandle,
  skeleton: ArrowSkeleton,
  job: BatchJob,
  onBatch: (done: number, all: number) => void,
) {
  if (job.chunks.some(isSpilled)) return writeStaged(file, skeleton, job, onBatch)
  const inMemory = { ...job, chunks: job.chunks as GroupedChunk[] }
  return writeGathered(file, skeleton, inMemory, onBatch)
}

async function writeGathered(
  file: FileHandle,
  skeleton: ArrowSkeleton,
  job: { batches: TileBatch[]; chunks: GroupedChunk[]; kinds: OutputKind[] },
  onBatch: (done: number, all: number) => void,
) {
  const writes = new Set<Promise<unknown>>()
  for (let b = 0; b < job.batches.length; b++) {
    for (let c = 0; c < job.kinds.length; c++) {
      const pieces = slices(job.chunks, c, job.batches[b]!.key, job.kinds[c]!)
      await bounded(writes, file.writev(pieces, skeleton.holes[c]![b]!))
    }
    onBatch(b + 1, job.batches.length)
  }
  await Promise.all(writes)
}

async function bounded(writes: Set<Promise<unknown>>, write: Promise<unknown>) {
  writes.add(write)
  void write.finally(() => writes.delete(write)).catch(() => undefined)
  if (writes.size >= IN_FLIGHT) await Promise.race(writes)
}

/** Rows staged per run of tiles, all chunks together: bounds the staging buffers. */
const STAGED_ROWS = 4 << 20

async function writeStaged(
  file: FileHandle,
  skeleton: ArrowSkeleton,
  job: BatchJob,
  onBatch: (done: number, all: number) => void,
) {
  const runs = runsOf(job.batches, STAGED_ROWS)
  const most = Math.max(...runs.map((run) => run.reduce((n, b) => n + b.rowCount, 0)))
  const raw = new ArrayBuffer(most * 8)
  const out = new Uint8Array(most * 8)
  let done = 0
  for (const run of runs) {
    const first = run[0]!.key
    const end = run.at(-1)!.key + 1
    for (let c = 0; c < job.kinds.length; c++) {
      const staged = await stageColumn(job, c, first, end, raw, out)
      const writes = new Set<Promise<unknown>>()
      for (const [r, batch] of run.entries()) {
        const pieces = job.chunks.flatMap((chunk, i) => {
          const from = chunk.tileStarts[batch.key]! - chunk.tileStarts[first]!
          const to = chunk.tileStarts[batch.key + 1]! - chunk.tileStarts[first]!
          const at = staged.starts[i]!
          return to > from ? [out.subarray(at + from * staged.width, at + to * staged.width)] : []
        })
        await bounded(writes, file.writev(pieces, skeleton.holes[c]![done + r]!))
      }
      // The staging buffer is reused for the next column: its writes must have landed.
      await Promise.all(writes)
    }
    done += run.length
    onBatch(done, job.batches.length)
  }
}

/** Consecutive batches holding at most `rows` rows together (a larger tile runs alone). */
function runsOf(batches: TileBatch[], rows: number): TileBatch[][] {
  const runs: TileBatch[][] = []
  let run: TileBatch[] = []
  let held = 0
  for (const batch of batches) {
    if (run.length && held + batch.rowCount > rows) {
      runs.push(run)
      run = []
      held = 0
    }
    run.push(batch)
    held += batch.rowCount
  }
  if (run.length) runs.push(run)
  return runs
}

/**
 * Column `c` of tiles [first, end) of every chunk, one after another in `out`, in the output's
 * kind (a Uint8 column narrowed from its stored Uint16); `starts[i]` is chunk i's byte offset.
 */
async function stageColumn(
  job: BatchJob,
  c: number,
  first: number,
  end: number,
  raw: ArrayBuffer,
  out: Uint8Array,
) {
  const narrow = job.kinds[c] === 'uint8'
  const starts: number[] = []
  let at = 0
  let width = 1
  for (const chunk of job.chunks) {
    const from = chunk.tileStarts[first]!
    const to = chunk.tileStarts[end]!
    const rows = to - from
    const stored = isSpilled(chunk)
      ? await readSpilled(job.spill, chunk, c, from, to, raw)
      : chunk.columns[c]!.subarray(from, to)
    width = narrow ? 1 : stored.BYTES_PER_ELEMENT
    starts.push(at)
    if (narrow) out.set(stored, at)
    else out.set(new Uint8Array(stored.buffer, stored.byteOffset, rows * width), at)
    at += rows * width
  }
  return { starts, width }
}

async function readSpilled(
  spill: ChunkSpill,
  chunk: Extract<HeldChunk, { spilled: unknown }>,
  c: number,
  from: number,
  to: number,
  raw: ArrayBuffer,
): Promise<StoredArray> {
  const into = chunk.spilled[c]!.make(raw, 0, to - from)
  await spill.readRows(chunk, c, from, to, into)
  return into
}

/** The bytes of column `c` in tile `key`, chunk by chunk; Uint8 output narrows the Uint16 values. */
function slices(chunks: GroupedChunk[], c: number, key: number, kind: OutputKind): Uint8Array[] {
  const parts = chunks.flatMap((chunk) => {
    const from = chunk.tileStarts[key]!
    const to = chunk.tileStarts[key + 1]!
    return to > from ? [chunk.columns[c]!.subarray(from, to)] : []
  })
  if (kind !== 'uint8')
    return parts.map((p) => new Uint8Array(p.buffer, p.byteOffset, p.byteLength))
  const narrowed = new Uint8Array(parts.reduce((n, p) => n + p.length, 0))
  let at = 0
  for (const part of parts) {
    narrowed.set(part, at)
    at += part.length
  }
  return [narrowed]
}
