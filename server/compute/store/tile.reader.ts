/** `readTilesInBox`: the rows of an ingested table inside a region, reading only the tiles it meets. */
import { open } from 'node:fs/promises'
import { join, dirname } from 'node:path'
import { AsyncRecordBatchFileReader, RecordBatchReader, type RecordBatch } from 'apache-arrow'
import { meets, readTileIndex, type TileIndex } from './tile.index'
import type { Bounds } from './tile.grid'

type ColumnArray = Float32Array | Float64Array | Uint32Array | Uint16Array | Uint8Array

export interface BoxRows {
  rowCount: number
  /** One typed array per output column, by name; x and y in nm. */
  columns: Record<string, ColumnArray>
  tilesRead: number
  tilesTotal: number
}

/** Rows with xMin ≤ x ≤ xMax and yMin ≤ y ≤ yMax (nm, as stored), in file order. */
export async function readTilesInBox(
  outputPath: string,
  box: Bounds,
  /** The store's index when the caller holds it already (it is read otherwise). */
  known?: TileIndex,
): Promise<BoxRows> {
  const index = known ?? (await readTileIndex(outputPath))
  const wanted = index.tiles.filter((t) => meets(t.boundsNm, box))
  const names = index.columns.map((c) => c.name)
  const parts: ColumnArray[][] = names.map(() => [])
  const file = await open(join(dirname(outputPath), index.arrowFile), 'r')
  try {
    const reader = await RecordBatchReader.from(file)
    if (!(reader instanceof AsyncRecordBatchFileReader)) throw new Error('Not an Arrow IPC file')
    await reader.open()
    for (const tile of wanted) {
      const batch = await reader.readRecordBatch(tile.batch)
      if (batch) collectInside(batch, box, names, parts)
    }
  } finally {
    await file.close()
  }
  const columns = Object.fromEntries(names.map((name, i) => [name, concat(parts[i]!)]))
  const rowCount = columns[names[0] ?? '']?.length ?? 0
  return { rowCount, columns, tilesRead: wanted.length, tilesTotal: index.tiles.length }
}

function collectInside(batch: RecordBatch, box: Bounds, names: string[], parts: ColumnArray[][]) {
  const x = columnOf(batch, 'x')
  const y = columnOf(batch, 'y')
  const inside: number[] = []
  for (let i = 0; i < x.length; i++) {
    const xi = x[i]!
    const yi = y[i]!
    if (xi >= box.xMin && xi <= box.xMax && yi >= box.yMin && yi <= box.yMax) inside.push(i)
  }
  names.forEach((name, c) => {
    const values = columnOf(batch, name)
    const picked = emptyLike(values, inside.length)
    inside.forEach((row, j) => (picked[j] = values[row]!))
    parts[c]!.push(picked)
  })
}

function columnOf(batch: RecordBatch, name: string): ColumnArray {
  const values: unknown = batch.getChild(name)?.toArray()
  if (isColumnArray(values)) return values
  throw new Error(`Column ${name} is missing or not numeric`)
}

function isColumnArray(values: unknown): values is ColumnArray {
  return [Float32Array, Float64Array, Uint32Array, Uint16Array, Uint8Array].some(
    (t) => values instanceof t,
  )
}

function emptyLike(values: ColumnArray, length: number): ColumnArray {
  if (values instanceof Float32Array) return new Float32Array(length)
  if (values instanceof Float64Array) return new Float64Array(length)
  if (values instanceof Uint32Array) return new Uint32Array(length)
  return values instanceof Uint16Array ? new Uint16Array(length) : new Uint8Array(length)
}

function concat(parts: ColumnArray[]): ColumnArray {
  const total = parts.reduce((n, p) => n + p.length, 0)
  const out = emptyLike(parts[0] ?? new Float32Array(0), total)
  let at = 0
  for (const part of parts) {
    out.set(part, at)
    at += part.length
  }
  return out
}
