/**
 * Where chunks are parsed: in this thread, and in worker threads (parse-worker.pool.ts). All
 * answer the same requests: parse a chunk (keep its columns, return a summary), count the kept
 * rows per tile, and scatter one column at a time into a shared buffer.
 */
import {
  ChunkStore,
  type ChunkCounts,
  type ChunkSummary,
  type ScatterRequest,
  type Scattered,
} from './chunk.store'
import type { ParsePlan } from './parse-plan'
import type { TileGrid } from './tile.grid'

export type ToWorker =
  | { type: 'begin'; plan: ParsePlan }
  | { type: 'parse'; seq: number; buffer: ArrayBuffer; length: number }
  | { type: 'count'; grid: TileGrid }
  | { type: 'scatter'; request: ScatterRequest }
  | { type: 'end' }
export type FromWorker =
  | { type: 'ready' }
  | { type: 'parsed'; summary: ChunkSummary; buffer: ArrayBuffer }
  | { type: 'counted'; chunks: ChunkCounts[] }
  | { type: 'scattered'; scattered: Scattered }
  | { type: 'failed'; message: string }

export interface Parsed {
  summary: ChunkSummary
  buffer: ArrayBuffer
}

export interface ParseBackend {
  /** Loaded and able to take chunks. */
  readonly ready: boolean
  /** Chunks sent and not yet answered. */
  readonly inFlight: number
  /** Parses a chunk; the answer hands its buffer back for reuse. */
  parse(seq: number, bytes: Uint8Array<ArrayBuffer>): Promise<Parsed>
  /** Rows per tile of every kept chunk. */
  count(grid: TileGrid): Promise<ChunkCounts[]>
  /** Moves one column of every kept chunk into the shared buffer, in tile order. */
  scatter(request: ScatterRequest): Promise<Scattered>
}

export class InlineBackend implements ParseBackend {
  readonly ready = true
  readonly inFlight = 0
  private readonly store: ChunkStore

  constructor(plan: ParsePlan) {
    this.store = new ChunkStore(plan)
  }

  async parse(seq: number, bytes: Uint8Array<ArrayBuffer>): Promise<Parsed> {
    return { summary: this.store.parse(seq, bytes), buffer: bytes.buffer }
  }

  async count(grid: TileGrid) {
    return this.store.count(grid)
  }

  async scatter(request: ScatterRequest) {
    return this.store.scatter(request)
  }
}
