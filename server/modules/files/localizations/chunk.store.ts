/**
 * The parsed chunks one thread holds. Parsing keeps each chunk's columns and returns only its
 * summary; once the bounds of the whole table are known, `group` reorders every kept chunk by tile
 * (a counting sort, stable, so rows keep their source order within a tile) and hands them over.
 */
import { ChunkParser } from './chunk.parser'
import type { ParsePlan } from './parse-plan'
import type { RejectionTallies } from './rejections'
import type { StoredArray } from './slot.columns'
import type { TileGrid } from './tile.grid'
import { scatter, statsOf, type ColumnStats } from './typed.loops'

export type { ColumnStats }

export interface ChunkSummary {
  seq: number
  rows: number
  lines: number
  blankLines: number
  rejections: RejectionTallies
  stats: ColumnStats[]
}

export interface GroupedChunk {
  seq: number
  columns: StoredArray[]
  /** Rows of tile k are [tileStarts[k], tileStarts[k + 1]). */
  tileStarts: Uint32Array<ArrayBuffer>
}

export interface GroupResult {
  chunks: GroupedChunk[]
  /** xMin, xMax, yMin, yMax of the rows in each tile (±Infinity when empty). */
  tileBounds: Float64Array
}

export class ChunkStore {
  private readonly parser: ChunkParser
  private readonly kept = new Map<number, StoredArray[]>()
  private readonly xSlot: number
  private readonly ySlot: number

  constructor(plan: ParsePlan) {
    this.parser = new ChunkParser(plan)
    this.xSlot = plan.slots.findIndex((s) => s.role === 'x')
    this.ySlot = plan.slots.findIndex((s) => s.role === 'y')
  }

  parse(seq: number, bytes: Uint8Array): ChunkSummary {
    const { columns, ...chunk } = this.parser.parse(bytes)
    if (chunk.rows > 0) this.kept.set(seq, columns)
    return { seq, ...chunk, stats: columns.map((c) => statsOf(c)) }
  }

  group(grid: TileGrid): GroupResult {
    const tiles = grid.columns * grid.rows
    const tileBounds = new Float64Array(tiles * 4)
    for (let t = 0; t < tiles; t++)
      tileBounds.set([Infinity, -Infinity, Infinity, -Infinity], t * 4)
    const chunks: GroupedChunk[] = []
    for (const [seq, columns] of this.kept) {
      const x = columns[this.xSlot]
      const y = columns[this.ySlot]
      if (!(x instanceof Float32Array) || !(y instanceof Float32Array))
        throw new Error('x and y are Float32')
      const { keys, tileStarts } = tileKeys(grid, x, y, tileBounds)
      chunks.push({ seq, tileStarts, columns: columns.map((c) => scatter(c, keys, tileStarts)) })
    }
    this.kept.clear()
    return { chunks, tileBounds }
  }
}

function tileKeys(grid: TileGrid, x: Float32Array, y: Float32Array, bounds: Float64Array) {
  const keys = new Uint16Array(x.length)
  const tileStarts = new Uint32Array(grid.columns * grid.rows + 1)
  const { originX, originY, tileSizeNm, columns, rows } = grid
  for (let i = 0; i < x.length; i++) {
    const xi = x[i]!
    const yi = y[i]!
    // Same arithmetic as tileColumn/tileRow in tile.grid.ts, with the grid in locals.
    const c = Math.min(columns - 1, Math.max(0, Math.floor((xi - originX) / tileSizeNm)))
    const r = Math.min(rows - 1, Math.max(0, Math.floor((yi - originY) / tileSizeNm)))
    const k = r * columns + c
    keys[i] = k
    tileStarts[k + 1]!++
    const b = k * 4
    if (xi < bounds[b]!) bounds[b] = xi
    if (xi > bounds[b + 1]!) bounds[b + 1] = xi
    if (yi < bounds[b + 2]!) bounds[b + 2] = yi
    if (yi > bounds[b + 3]!) bounds[b + 3] = yi
  }
  for (let k = 1; k < tileStarts.length; k++) tileStarts[k]! += tileStarts[k - 1]!
  return { keys, tileStarts }
}
