/**
 * Writes the localizations as an Apache Arrow IPC file, one record batch per non-empty tile of the
 * grid, tiles in key order (row-major), rows within a tile in source order. Each tile's column is
 * assembled from the grouped chunks with plain copies.
 */
import {
  Field,
  Float32,
  Float64,
  makeData,
  RecordBatch,
  RecordBatchFileWriter,
  Schema,
  Struct,
  Uint16,
  Uint32,
  Uint8,
  type DataType,
} from 'apache-arrow'
import { ArrowFileSink } from './arrow-file.sink'
import type { ColumnStats, GroupedChunk } from './chunk.store'
import type { ParsePlan, SlotSpec } from './parse-plan'
import type { StoredArray } from './slot.columns'
import type { Bounds, TileGrid } from './tile.grid'

export interface WrittenTile {
  key: number
  column: number
  row: number
  /** Index of its record batch in the file. */
  batch: number
  /** First row of the tile in the whole table. */
  rowStart: number
  rowCount: number
  /** Bounds of the tile's rows (not of the tile), nm. */
  boundsNm: Bounds
}

export interface TiledOutput {
  schema: Schema
  tiles: WrittenTile[]
  bytes: number
}

type OutputArray = StoredArray | Uint8Array
type ArrayMaker = (length: number) => OutputArray

interface OutputColumn {
  field: Field
  make: ArrayMaker
}

/** Arrow fields for the slots; a channel column whose values all fit in a byte is stored as Uint8. */
export function outputColumns(
  plan: ParsePlan,
  stats: ColumnStats[],
  metadata: Map<string, string>,
) {
  const columns = plan.slots.map((slot, s) => outputColumn(slot, stats[s]))
  return {
    columns,
    schema: new Schema(
      columns.map((c) => c.field),
      metadata,
    ),
  }
}

function outputColumn(slot: SlotSpec, stats: ColumnStats | undefined): OutputColumn {
  const meta = new Map([
    ['role', slot.role],
    ['source_column', slot.sourceName],
  ])
  if (slot.storedUnit) meta.set('unit', slot.storedUnit)
  const field = (type: DataType) => new Field(slot.name, type, false, meta)
  if (slot.storage === 'float32')
    return { field: field(new Float32()), make: (n) => new Float32Array(n) }
  if (slot.storage === 'float64')
    return { field: field(new Float64()), make: (n) => new Float64Array(n) }
  if (slot.storage === 'uint32')
    return { field: field(new Uint32()), make: (n) => new Uint32Array(n) }
  if ((stats?.max ?? 0) <= 255) return { field: field(new Uint8()), make: (n) => new Uint8Array(n) }
  return { field: field(new Uint16()), make: (n) => new Uint16Array(n) }
}

export async function writeTiledArrow(
  path: string,
  output: { columns: OutputColumn[]; schema: Schema },
  grid: TileGrid,
  grouped: { chunks: GroupedChunk[]; tileBounds: Float64Array },
  onTile: (done: number, total: number) => void,
): Promise<TiledOutput> {
  const sink = new ArrowFileSink(new RecordBatchFileWriter().reset(undefined, output.schema), path)
  const tiles: WrittenTile[] = []
  const total = grid.columns * grid.rows
  let rowStart = 0
  for (let key = 0; key < total; key++) {
    const rowCount = grouped.chunks.reduce(
      (n, c) => n + c.tileStarts[key + 1]! - c.tileStarts[key]!,
      0,
    )
    if (rowCount > 0) {
      await sink.write(tileBatch(output, grouped.chunks, key, rowCount))
      const b = grouped.tileBounds.subarray(key * 4, key * 4 + 4)
      const boundsNm = { xMin: b[0]!, xMax: b[1]!, yMin: b[2]!, yMax: b[3]! }
      const cell = { column: key % grid.columns, row: Math.floor(key / grid.columns) }
      tiles.push({ key, ...cell, batch: tiles.length, rowStart, rowCount, boundsNm })
      rowStart += rowCount
    }
    onTile(key + 1, total)
  }
  const bytes = await sink.finish()
  return { schema: output.schema, tiles, bytes }
}

function tileBatch(
  output: { columns: OutputColumn[]; schema: Schema },
  chunks: GroupedChunk[],
  key: number,
  rows: number,
) {
  const children = output.columns.map((column, s) => {
    const values = column.make(rows)
    let at = 0
    for (const chunk of chunks) {
      const from = chunk.tileStarts[key]!
      const to = chunk.tileStarts[key + 1]!
      if (to > from) values.set(chunk.columns[s]!.subarray(from, to), at)
      at += to - from
    }
    return makeData({ type: column.field.type, data: values, length: rows, nullCount: 0 })
  })
  const data = makeData({
    type: new Struct(output.schema.fields),
    length: rows,
    nullCount: 0,
    children,
  })
  return new RecordBatch(output.schema, data)
}
