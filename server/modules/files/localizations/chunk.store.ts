/**
 * The parsed chunks one thread holds. Parsing keeps each chunk's columns and returns only its
 * summary. Once the bounds of the whole table are known, `count` gives every chunk's rows per tile
 * and `scatter` moves one column's rows straight into a shared, tile-ordered buffer (a counting
 * sort across all threads: stable, so rows keep their source order within a tile).
 */
import { ChunkParser } from './chunk.parser'
import { BYTES_PER_VALUE, viewOf, type OutputKind } from './output.columns'
import type { ParsePlan } from './parse-plan'
import type { RejectionTallies } from './rejections'
import type { StoredArray } from './slot.columns'
import type { TileGrid } from './tile.grid'
import { newTally, scatterInto, statsOf, tallyStats, type ColumnStats } from './typed.loops'

export type { ColumnStats }

export interface ChunkSummary {
  seq: number
  rows: number
  lines: number
  blankLines: number
  rejections: RejectionTallies
  /** Statistics of the slots needed before writing (x, y, channel); null for the others. */
  stats: (ColumnStats | null)[]
}

export interface ChunkCounts {
  seq: number
  /** Rows of the chunk in each tile. */
  counts: Uint32Array<ArrayBuffer>
}

export interface ScatterRequest {
  slot: number
  kind: OutputKind
  buffer: SharedArrayBuffer
  offsets: Map<number, Uint32Array>
  tiles: number
}

export interface Scattered {
  stats: ColumnStats
  /** Per tile: min and max of this thread's values (x and y only). */
  ranges: Float64Array | null
}

const EMPTY = new Float32Array(0)
export const EAGER_ROLES: readonly string[] = ['x', 'y', 'channel']

export class ChunkStore {
  private readonly parser: ChunkParser
  private readonly kept = new Map<number, StoredArray[]>()
  private readonly keys = new Map<number, Uint16Array>()
  private readonly xSlot: number
  private readonly ySlot: number
  private readonly slotCount: number
  /** Slots whose statistics the grid and the output types need; the rest are counted later. */
  private readonly eager: boolean[]
  private scattered = 0

  constructor(plan: ParsePlan) {
    this.slotCount = plan.slots.length
    this.eager = plan.slots.map((s) => EAGER_ROLES.includes(s.role))
    this.parser = new ChunkParser(plan)
    this.xSlot = plan.slots.findIndex((s) => s.role === 'x')
    this.ySlot = plan.slots.findIndex((s) => s.role === 'y')
  }

  parse(seq: number, bytes: Uint8Array): ChunkSummary {
    const { columns, ...chunk } = this.parser.parse(bytes)
    if (chunk.rows > 0) this.kept.set(seq, columns)
    const stats = columns.map((c, s) => (this.eager[s] ? statsOf(c) : null))
    return { seq, ...chunk, stats }
  }

  count(grid: TileGrid): ChunkCounts[] {
    const chunks: ChunkCounts[] = []
    for (const [seq, columns] of this.kept) {
      const x = columns[this.xSlot]
      const y = columns[this.ySlot]
      if (!(x instanceof Float32Array) || !(y instanceof Float32Array))
        throw new Error('x and y are Float32')
      const { keys, counts } = tileKeys(grid, x, y)
      this.keys.set(seq, keys)
      chunks.push({ seq, counts })
    }
    return chunks
  }

  /**
   * One output column into `buffer`, in tile order; each parsed column is let go once placed.
   * Returns the column's statistics over this thread's rows, and for x and y each tile's range.
   */
  scatter(request: ScatterRequest): Scattered {
    const { slot, kind, buffer, offsets } = request
    const target = viewOf(kind, buffer, Math.floor(buffer.byteLength / BYTES_PER_VALUE[kind]))
    const tally = newTally()
    const ranged = slot === this.xSlot || slot === this.ySlot
    const ranges = ranged ? new Float64Array(request.tiles * 2).fill(Infinity) : null
    for (let k = 1; ranges && k < ranges.length; k += 2) ranges[k] = -Infinity
    let rows = 0
    for (const [seq, columns] of this.kept) {
      const values = columns[slot]!
      scatterInto(values, target, this.keys.get(seq)!, offsets.get(seq)!.slice(), tally, ranges)
      rows += values.length
      columns[slot] = EMPTY
    }
    if (++this.scattered === this.slotCount) {
      this.kept.clear()
      this.keys.clear()
    }
    return { stats: tallyStats(tally, rows), ranges }
  }
}

function tileKeys(grid: TileGrid, x: Float32Array, y: Float32Array) {
  const keys = new Uint16Array(x.length)
  const counts = new Uint32Array(grid.columns * grid.rows)
  const { originX, originY, columns, rows } = grid
  const perNm = 1 / grid.tileSizeNm
  const lastColumn = columns - 1
  const lastRow = rows - 1
  for (let i = 0; i < x.length; i++) {
    // tileKey of tile.grid.ts in locals; x ≥ originX and y ≥ originY, so `| 0` floors.
    let c = ((x[i]! - originX) * perNm) | 0
    let r = ((y[i]! - originY) * perNm) | 0
    if (c > lastColumn) c = lastColumn
    if (r > lastRow) r = lastRow
    const k = r * columns + c
    keys[i] = k
    counts[k]!++
  }
  return { keys, counts }
}
