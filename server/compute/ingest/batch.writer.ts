/**
 * Writes the column data of every record batch into the holes of the Arrow skeleton. A batch is
 * one tile; its rows sit in every chunk's slice for that tile (chunks in source order), so each
 * column of a batch is one gathered write of those slices: no copy of the table is made.
 */
import type { FileHandle } from 'node:fs/promises'
import type { ArrowSkeleton } from '../store/arrow-skeleton.writer'
import type { GroupedChunk } from './chunk.processor'
import type { OutputKind } from './output.columns'

/** A non-empty tile: one record batch. */
export interface TileBatch {
  key: number
  rowStart: number
  rowCount: number
}

const IN_FLIGHT = 8

export async function writeBatches(
  file: FileHandle,
  skeleton: ArrowSkeleton,
  job: { batches: TileBatch[]; chunks: GroupedChunk[]; kinds: OutputKind[] },
  onBatch: (done: number, all: number) => void,
) {
  const writes = new Set<Promise<unknown>>()
  for (let b = 0; b < job.batches.length; b++) {
    for (let c = 0; c < job.kinds.length; c++) {
      const pieces = slices(job.chunks, c, job.batches[b]!.key, job.kinds[c]!)
      const write = file.writev(pieces, skeleton.holes[c]![b]!)
      writes.add(write)
      void write.finally(() => writes.delete(write)).catch(() => undefined)
      if (writes.size >= IN_FLIGHT) await Promise.race(writes)
    }
    onBatch(b + 1, job.batches.length)
  }
  await Promise.all(writes)
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
