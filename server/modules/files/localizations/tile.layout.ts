/**
 * Where rows go in the tile-ordered output: tiles in key order, and inside a tile the chunks in
 * source order (so rows keep their source order within a tile).
 */
import type { ChunkCounts } from './chunk.store'

export interface TileLayout {
  /** First output row of each tile; entry `tiles` is the row count. */
  tileStarts: Float64Array
  /** Per chunk: for each tile, the output row its first row of that tile goes to. */
  chunkOffsets: Map<number, Uint32Array<ArrayBuffer>>
  rows: number
}

export function layTiles(chunks: ChunkCounts[], tiles: number): TileLayout {
  const tileStarts = new Float64Array(tiles + 1)
  for (const chunk of chunks) {
    for (let k = 0; k < tiles; k++) tileStarts[k + 1]! += chunk.counts[k]!
  }
  for (let k = 1; k <= tiles; k++) tileStarts[k]! += tileStarts[k - 1]!
  const cursor = tileStarts.slice(0, tiles)
  const chunkOffsets = new Map<number, Uint32Array<ArrayBuffer>>()
  for (const chunk of [...chunks].sort((a, b) => a.seq - b.seq)) {
    chunkOffsets.set(chunk.seq, Uint32Array.from(cursor))
    for (let k = 0; k < tiles; k++) cursor[k]! += chunk.counts[k]!
  }
  return { tileStarts, chunkOffsets, rows: tileStarts[tiles]! }
}
