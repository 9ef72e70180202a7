/**
 * One chunk from bytes to columns grouped by tile: parsed, then reordered by a counting sort on
 * the tiles of its rows while it is still in cache (stable: rows keep their source order within
 * a tile). The grid is fixed before: laid over the first rows (see chunk.dispatcher.ts).
 */
import { ChunkParser } from './chunk.parser'
import type { ParsePlan } from './parse-plan'
import type { RejectionTallies } from './rejections'
import type { StoredArray } from './stored-array'
import type { TileGrid } from '../store/tile.grid'
import {
  emptyLike,
  newTally,
  scatterInto,
  statsOf,
  tallyStats,
  type ColumnStats,
} from './typed.loops'

export type { ColumnStats }

export interface ChunkSummary {
  seq: number
  rows: number
  lines: number
  blankLines: number
  rejections: RejectionTallies
  stats: ColumnStats[]
  /** Rows outside the grid's extent, put in its edge tiles. */
  outside: number
}

/** Where each tile's rows sit in a chunk grouped by tile, and their extent. */
export interface TileLayout {
  seq: number
  /** Rows of tile k are [tileStarts[k], tileStarts[k + 1]). */
  tileStarts: Uint32Array<ArrayBuffer>
  /** Per tile: min and max of x, and of y (±Infinity where the chunk has no row). */
  xRanges: Float64Array<ArrayBuffer>
  yRanges: Float64Array<ArrayBuffer>
}

export interface GroupedChunk extends TileLayout {
  /** One array per slot, rows ordered by tile. */
  columns: StoredArray[]
}

export interface ProcessedChunk {
  summary: ChunkSummary
  grouped: GroupedChunk
}

/** The grid for a table, from the bounds of x and y in its first rows and their number. */
export type GridRule = (x: ColumnStats, y: ColumnStats, rows: number) => TileGrid

export interface FirstChunk {
  processed: ProcessedChunk | null
  summary: ChunkSummary
  grid: TileGrid | null
}

export class ChunkProcessor {
  private readonly parser: ChunkParser
  private readonly xSlot: number
  private readonly ySlot: number

  constructor(
    private readonly plan: ParsePlan,
    options: { fastPath?: boolean } = {},
  ) {
    this.parser = new ChunkParser(plan, options)
    this.xSlot = plan.slots.findIndex((s) => s.role === 'x')
    this.ySlot = plan.slots.findIndex((s) => s.role === 'y')
  }

  process(seq: number, bytes: Uint8Array, grid: TileGrid): ProcessedChunk {
    return this.group(seq, this.parser.parse(bytes), grid)
  }

  /**
   * Until the grid is fixed: parses, and when the chunk has rows, asks `gridFor` for the grid
   * from the bounds of its x and y, then groups. Without rows there is nothing to lay a grid on.
   */
  processFirst(seq: number, bytes: Uint8Array, gridFor: GridRule): FirstChunk {
    const parsed = this.parser.parse(bytes)
    if (parsed.rows === 0) {
      const { columns: _none, ...counts } = parsed
      return { processed: null, summary: { seq, ...counts, stats: [], outside: 0 }, grid: null }
    }
    const x = statsOf(parsed.columns[this.xSlot]!)
    const y = statsOf(parsed.columns[this.ySlot]!)
    const grid = gridFor(x, y, parsed.rows)
    const processed = this.group(seq, parsed, grid)
    return { processed, summary: processed.summary, grid }
  }

  /** A grouped chunk again, on another grid (its rows keep their order within each tile). */
  regroup(chunk: GroupedChunk, grid: TileGrid): GroupedChunk {
    const rows = chunk.columns[0]?.length ?? 0
    const parsed = { rows, lines: 0, blankLines: 0, rejections: {}, columns: chunk.columns }
    return this.group(chunk.seq, parsed, grid).grouped
  }

  private group(
    seq: number,
    parsed: ReturnType<ChunkParser['parse']>,
    grid: TileGrid,
  ): ProcessedChunk {
    const { columns, ...counts } = parsed
    const shared = this.parser.shared
    if (shared?.holds(columns)) {
      const {
        columns: grouped,
        stats,
        outside,
        ...layout
      } = shared.group(columns, grid, this.xSlot, this.ySlot)
      return {
        summary: { seq, ...counts, stats, outside },
        grouped: { seq, columns: grouped, ...layout },
      }
    }
    const x = columns[this.xSlot]
    const y = columns[this.ySlot]
    if (!(x instanceof Float32Array) || !(y instanceof Float32Array))
      throw new Error('x and y are Float32')
    const { keys, tileStarts, outside } = tileKeys(grid, x, y)
    const tiles = grid.columns * grid.rows
    const xRanges = emptyRanges(tiles)
    const yRanges = emptyRanges(tiles)
    const stats: ColumnStats[] = []
    const grouped = columns.map((values, s) => {
      const target = emptyLike(values)
      const tally = newTally()
      const ranges = s === this.xSlot ? xRanges : s === this.ySlot ? yRanges : null
      scatterInto(values, target, keys, tileStarts.slice(0, tiles), tally, ranges)
      stats.push(tallyStats(tally, values.length))
      return target
    })
    return {
      summary: { seq, ...counts, stats, outside },
      grouped: { seq, columns: grouped, tileStarts, xRanges, yRanges },
    }
  }
}

function emptyRanges(tiles: number) {
  const ranges = new Float64Array(tiles * 2)
  for (let k = 0; k < ranges.length; k += 2) ranges.set([Infinity, -Infinity], k)
  return ranges
}

/**
 * Each row's tile key and the tiles' first rows. Column c = ⌊(x − originX) · (1/size)⌋ clamped to
 * the grid (multiplying by the inverse is cheaper than dividing, over millions of rows); row r
 * likewise from y; key = r · columns + c.
 */
function tileKeys(grid: TileGrid, x: Float32Array, y: Float32Array) {
  const keys = new Uint16Array(x.length)
  const tiles = grid.columns * grid.rows
  const tileStarts = new Uint32Array(tiles + 1)
  const { originX, originY, columns, rows } = grid
  const perNm = 1 / grid.tileSizeNm
  let outside = 0
  for (let i = 0; i < x.length; i++) {
    const fc = (x[i]! - originX) * perNm
    const fr = (y[i]! - originY) * perNm
    if (fc < 0 || fr < 0 || fc >= columns || fr >= rows) outside++
    const c = fc >= columns ? columns - 1 : fc > 0 ? fc | 0 : 0
    const r = fr >= rows ? rows - 1 : fr > 0 ? fr | 0 : 0
    const k = r * columns + c
    keys[i] = k
    tileStarts[k + 1]!++
  }
  for (let k = 1; k <= tiles; k++) tileStarts[k]! += tileStarts[k - 1]!
  return { keys, tileStarts, outside }
}
