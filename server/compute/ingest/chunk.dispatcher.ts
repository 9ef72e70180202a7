/**
 * Sends chunks to the workers as they are read, at most a couple waiting per worker, so reading,
 * decompressing and parsing overlap while memory stays bounded. This thread processes the first
 * chunk with rows itself, which fixes the tile grid (laid over that chunk's bounds), and any chunk
 * read before a worker has started (a few hundred ms).
 */
import type { BufferPool } from './buffer.pool'
import type { TableChunk } from './chunk.reader'
import type { ChunkSummary, GridRule, GroupedChunk } from './chunk.processor'
import type { HeldChunk } from './chunk.spill'
import type { ChunkBackend, InlineBackend, Processed } from './ingest.backends'
import type { TileGrid } from '../store/tile.grid'

const MAX_IN_FLIGHT = 2

export interface Dispatch {
  inline: InlineBackend
  workers: ChunkBackend[]
  buffers: BufferPool
  /** The grid from the first rows; `readFraction` says how much of the file they are. */
  gridFor: (readFraction: number) => GridRule
  onProcessed: (readFraction: number) => void
  /** Called with the rows processed so far; throws to stop the ingest (limits). */
  checkRows?: (rows: number) => void
  /** Holds a processed chunk until the output is written: in memory or spilled (chunk.spill.ts). */
  keep: (chunk: GroupedChunk) => HeldChunk
}

export interface HeldProcessed {
  summary: ChunkSummary
  grouped: HeldChunk | null
}

export async function processChunks(chunks: AsyncIterable<TableChunk>, d: Dispatch) {
  const done: HeldProcessed[] = []
  const running = new Set<Promise<void>>()
  let failure: unknown = null
  let grid: TileGrid | null = null
  let seq = 0
  let rows = 0
  const finish = (processed: Processed, readFraction: number) => {
    const grouped = processed.grouped && d.keep(processed.grouped)
    done.push({ summary: processed.summary, grouped })
    d.buffers.give(processed.buffer)
    d.onProcessed(readFraction)
    rows += processed.summary.rows
    try {
      d.checkRows?.(rows)
    } catch (error) {
      failure ??= error
    }
  }
  for await (const chunk of chunks) {
    if (failure) break
    if (!grid) {
      const first = d.inline.first(seq++, chunk.bytes, d.gridFor(chunk.readFraction))
      grid = first.grid
      finish(first.processed, chunk.readFraction)
      continue
    }
    const backend = await pickBackend(d, running)
    if (failure) break
    const task: Promise<void> = backend
      .process(seq++, chunk.bytes, grid)
      .then(
        (processed) => finish(processed, chunk.readFraction),
        (error: unknown) => void (failure ??= error),
      )
      .finally(() => running.delete(task))
    running.add(task)
  }
  await Promise.all(running)
  if (failure) throw failure
  return { processed: done.sort((a, b) => a.summary.seq - b.summary.seq), grid }
}

/** A started worker with room; this thread while none has started; else wait for room. */
async function pickBackend(d: Dispatch, running: Set<Promise<void>>): Promise<ChunkBackend> {
  for (;;) {
    const started = d.workers.filter((w) => w.ready)
    if (started.length === 0) return d.inline
    const free = started.filter((w) => w.inFlight < MAX_IN_FLIGHT)
    if (free.length > 0) return free.reduce((a, b) => (b.inFlight < a.inFlight ? b : a))
    await Promise.race(running)
  }
}
