/**
 * Where chunks are processed (parsed and grouped by tile): in this thread, or in worker threads
 * (parse-worker.pool.ts). This thread also takes the first chunk with rows, which fixes the grid.
 */
import {
  ChunkProcessor,
  type ChunkSummary,
  type GridRule,
  type GroupedChunk,
} from './chunk.processor'
import type { ParsePlan } from './parse-plan'
import type { TileGrid } from '../store/tile.grid'

export type ToWorker =
  | { type: 'begin'; plan: ParsePlan }
  | { type: 'process'; seq: number; buffer: ArrayBuffer; length: number; grid: TileGrid }
  | { type: 'end' }
export type FromWorker =
  | { type: 'ready' }
  | { type: 'processed'; summary: ChunkSummary; grouped: GroupedChunk; buffer: ArrayBuffer }
  | { type: 'failed'; message: string }

export interface Processed {
  summary: ChunkSummary
  /** Null for a chunk without rows seen before the grid was fixed. */
  grouped: GroupedChunk | null
  /** The chunk's buffer, handed back for reuse. */
  buffer: ArrayBuffer
}

export interface ChunkBackend {
  /** Loaded and able to take chunks. */
  readonly ready: boolean
  /** Chunks sent and not yet answered. */
  readonly inFlight: number
  process(seq: number, bytes: Uint8Array<ArrayBuffer>, grid: TileGrid): Promise<Processed>
}

export class InlineBackend implements ChunkBackend {
  readonly ready = true
  readonly inFlight = 0
  private readonly processor: ChunkProcessor

  constructor(plan: ParsePlan) {
    this.processor = new ChunkProcessor(plan)
  }

  async process(seq: number, bytes: Uint8Array<ArrayBuffer>, grid: TileGrid): Promise<Processed> {
    return { ...this.processor.process(seq, bytes, grid), buffer: bytes.buffer }
  }

  regroup(chunk: GroupedChunk, grid: TileGrid): GroupedChunk {
    return this.processor.regroup(chunk, grid)
  }

  /** A chunk before the grid is fixed; the grid too, once the chunk has rows. */
  first(seq: number, bytes: Uint8Array<ArrayBuffer>, gridFor: GridRule) {
    const first = this.processor.processFirst(seq, bytes, gridFor)
    const grouped = first.processed?.grouped ?? null
    const processed: Processed = { summary: first.summary, grouped, buffer: bytes.buffer }
    return { processed, grid: first.grid }
  }
}
