/**
 * The rows of a store inside a box, for preview tiles: many small reads of one store in a row.
 * Per store (and write time) it keeps the file open, its tile index and its batch layout; per
 * column it keeps one scratch buffer that grows to the largest batch and is reused, so a tile
 * allocates only its own rows (first touches of fresh memory cost ≈3 ms per MB here, more than
 * the read). For each store tile that meets the box it reads x and y, then the other wanted
 * columns only where some rows fall inside (all of a tile that lies inside the box).
 */
import { statSync } from 'node:fs'
import { open, type FileHandle } from 'node:fs/promises'
import { dirname, join } from 'node:path'
import { readIntoSync, readStoreLayout, type ColumnArray, type StoreLayout } from './column-reader'
import type { Bounds } from './tile.grid'
import { meets, readTileIndex, type TileIndex } from './tile.index'
import type { BoxRows } from './tile.reader'

const OPEN_STORES = 16

interface OpenStore {
  mtimeMs: number
  file: FileHandle
  index: TileIndex
  layout: StoreLayout
}

const within = (inner: Bounds, outer: Bounds) =>
  inner.xMin >= outer.xMin &&
  inner.xMax <= outer.xMax &&
  inner.yMin >= outer.yMin &&
  inner.yMax <= outer.yMax

export class StoreBoxReader {
  private readonly stores = new Map<string, Promise<OpenStore | null>>()
  private scratch: Uint8Array[] = []
  private picked = new Uint32Array(0)
  /** Calls run one after another: they share the scratch buffers. */
  private queue: Promise<unknown> = Promise.resolve()

  /**
   * Rows with xMin ≤ x ≤ xMax and yMin ≤ y ≤ yMax, in file order, of the columns `wanted` names;
   * null when the store is not one this reader handles (the caller reads it the general way).
   */
  rowsInBox(arrowPath: string, box: Bounds, wanted: (name: string) => boolean) {
    const result = this.queue.then(() => this.read(arrowPath, box, wanted))
    this.queue = result.catch(() => {})
    return result
  }

  async close() {
    const stores = [...this.stores.values()]
    this.stores.clear()
    for (const store of await Promise.all(stores)) await store?.file.close()
  }

  private async read(
    arrowPath: string,
    box: Bounds,
    wanted: (name: string) => boolean,
  ): Promise<BoxRows | null> {
    const store = await this.storeOf(arrowPath)
    if (!store) return null
    const { file, index, layout } = store
    const names = layout.fields.map((f) => f.name)
    const xc = names.indexOf('x')
    const yc = names.indexOf('y')
    const columns = names.map((name, c) => c === xc || c === yc || wanted(name))
    const parts: ColumnArray[][] = names.map(() => [])
    const tiles = index.tiles.filter((t) => meets(t.boundsNm, box))
    for (const tile of tiles) {
      const batch = layout.batches[tile.batch]!
      const view = (c: number) => layout.make[c]!(this.scratch[c]!.buffer, batch.rows)
      const load = (c: number) => this.load(file, layout, tile.batch, c)
      if (within(tile.boundsNm, box)) {
        for (let c = 0; c < names.length; c++)
          if (columns[c]) parts[c]!.push((load(c), view(c)).slice())
        continue
      }
      load(xc)
      load(yc)
      const count = this.inside(view(xc), view(yc), box)
      if (count === 0) continue
      for (let c = 0; c < names.length; c++) {
        if (!columns[c]) continue
        if (c !== xc && c !== yc) load(c)
        parts[c]!.push(pick(view(c), this.picked, count))
      }
    }
    const out: Record<string, ColumnArray> = {}
    names.forEach((name, c) => {
      if (columns[c]) out[name] = concat(parts[c]!, layout.make[c]!)
    })
    const rowCount = out[names[xc]!]!.length
    return { rowCount, columns: out, tilesRead: tiles.length, tilesTotal: index.tiles.length }
  }

  /** Row numbers inside the box, into `picked`; their count. */
  private inside(x: ColumnArray, y: ColumnArray, box: Bounds): number {
    if (this.picked.length < x.length) this.picked = new Uint32Array(x.length)
    const picked = this.picked
    let n = 0
    for (let i = 0; i < x.length; i++) {
      const xi = x[i]!
      const yi = y[i]!
      if (xi >= box.xMin && xi <= box.xMax && yi >= box.yMin && yi <= box.yMax) picked[n++] = i
    }
    return n
  }

  private load(file: FileHandle, layout: StoreLayout, batchNo: number, c: number) {
    const batch = layout.batches[batchNo]!
    const bytes = batch.rows * layout.bytesPerValue[c]!
    if ((this.scratch[c]?.length ?? 0) < bytes) this.scratch[c] = new Uint8Array(bytes)
    // Synchronous: a tile thread has nothing else to do meanwhile, and a read from the page cache
    // is quicker than the round trip through libuv's thread pool.
    readIntoSync(file.fd, this.scratch[c]!, 0, bytes, batch.valuesAt[c]!)
  }

  private async storeOf(arrowPath: string): Promise<OpenStore | null> {
    // Synchronous for the same reason as the reads: one inode lookup, no thread-pool round trip.
    const { mtimeMs } = statSync(arrowPath)
    const known = await this.stores.get(arrowPath)
    if (known?.mtimeMs === mtimeMs) return known
    if (known) await known.file.close()
    const opening = (async () => {
      const index = await readTileIndex(arrowPath)
      const file = await open(join(dirname(arrowPath), index.arrowFile), 'r')
      const layout = await readStoreLayout(file)
      const names = layout?.fields.map((f) => f.name) ?? []
      if (!layout || !names.includes('x') || !names.includes('y')) {
        await file.close()
        return null
      }
      return { mtimeMs, file, index, layout }
    })()
    this.stores.delete(arrowPath)
    this.stores.set(arrowPath, opening)
    // Few stores are viewed at once; the longest unused one is let go (Map keeps insertion order).
    if (this.stores.size > OPEN_STORES) {
      const [oldest, store] = this.stores.entries().next().value!
      this.stores.delete(oldest)
      void store.then((s) => s?.file.close())
    }
    return opening
  }
}

function pick(values: ColumnArray, rows: Uint32Array, count: number): ColumnArray {
  const out = new (values.constructor as new (n: number) => ColumnArray)(count)
  for (let j = 0; j < count; j++) out[j] = values[rows[j]!]!
  return out
}

function concat(
  parts: ColumnArray[],
  make: (buffer: ArrayBufferLike, length: number) => ColumnArray,
): ColumnArray {
  if (parts.length === 1) return parts[0]!
  const total = parts.reduce((n, p) => n + p.length, 0)
  const bytesPerValue = parts[0]?.BYTES_PER_ELEMENT ?? 4
  const out = make(new ArrayBuffer(total * bytesPerValue), total)
  let at = 0
  for (const part of parts) {
    out.set(part, at)
    at += part.length
  }
  return out
}
