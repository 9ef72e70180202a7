/**
 * The chunk parser's WebAssembly fast path (assembly/plain-rows.ts) and the linear memory it
 * shares with the parser: each chunk's bytes are copied there, and the slot columns live there
 * too (slot.columns.ts allocates them through `alloc`), so rows the fast path stores and rows the
 * TypeScript parser stores land in the same arrays. The same module then groups the columns by
 * tile (chunk.processor.ts), and they leave its memory as the grouped copies the ingest keeps.
 * One instance, and one memory, per parser.
 */
import type { ParsePlan } from './parse-plan'
import { PLAIN_ROWS_WASM } from './plain-rows.wasm'
import type { StoredArray } from './stored-array'
import type { ColumnStats } from './typed.loops'
import type { TileGrid } from '../store/tile.grid'

interface PlainRowsExports {
  memory: WebAssembly.Memory
  MAX_FIELDS: WebAssembly.Global
  dataStart(): number
  setFormat(fields: number, delimiter: number, decimalMark: number): void
  setField(field: number, kind: number, address: number, factor: number, max: number): void
  rowsParsed(): number
  parseRows(at: number, end: number, row: number, capacity: number): number
  tileKeys(
    xAt: number,
    yAt: number,
    rows: number,
    originX: number,
    originY: number,
    perNm: number,
    gridColumns: number,
    gridRows: number,
    keysAt: number,
    startsAt: number,
    xRangesAt: number,
    yRangesAt: number,
  ): number
  scatter(
    kind: number,
    fromAt: number,
    toAt: number,
    rows: number,
    keysAt: number,
    cursorAt: number,
  ): void
  tallyOf(which: 0 | 1 | 2): number
}

/** A chunk's columns in tile order, each tile's first row and x and y range. */
export interface TileGroups {
  columns: StoredArray[]
  stats: ColumnStats[]
  tileStarts: Uint32Array<ArrayBuffer>
  xRanges: Float64Array<ArrayBuffer>
  yRanges: Float64Array<ArrayBuffer>
  outside: number
}

/** Field kinds as the module numbers them; SKIP for a field no slot reads. */
export const FIELD_KIND = { skip: 0, float32: 1, float64: 2, uint32: 3, uint16: 4 } as const

const PAGE_BYTES = 65_536
const ALIGN = 64
/** Zero bytes after a chunk's copy: they end any scan the module makes. */
const SENTINEL_BYTES = 64

let compiled: WebAssembly.Module | null = null
function plainRowsModule() {
  compiled ??= new WebAssembly.Module(Buffer.from(PLAIN_ROWS_WASM, 'base64'))
  return compiled
}

export class PlainRows {
  private readonly wasm: PlainRowsExports
  private readonly base: number
  private top: number
  private inputAt = 0
  private inputLength = 0
  private inputView = new Uint8Array(0)
  /** Rows stored by the last `parse`. */
  rows = 0

  /** The fast path for tables it reads: delimited, and not wider than the module's tables. */
  static for(plan: ParsePlan): PlainRows | null {
    if (plan.delimiter === 'whitespace') return null
    const rows = new PlainRows()
    if (plan.fieldCount > (rows.wasm.MAX_FIELDS.value as number)) return null
    rows.wasm.setFormat(
      plan.fieldCount,
      plan.delimiter.charCodeAt(0),
      plan.decimalMark.charCodeAt(0),
    )
    for (let field = 0; field < plan.fieldCount; field++)
      rows.wasm.setField(field, FIELD_KIND.skip, 0, 0, 0)
    return rows
  }

  private constructor() {
    const instance = new WebAssembly.Instance(plainRowsModule(), {
      env: { abort: () => void 0 },
    })
    this.wasm = instance.exports as unknown as PlainRowsExports
    this.base = this.wasm.dataStart()
    this.top = this.base
  }

  /** The buffer behind every view: a new one each time the memory grows. */
  get buffer(): ArrayBuffer {
    return this.wasm.memory.buffer
  }

  /** Starts a chunk: frees what the last one used and copies `bytes` in. */
  load(bytes: Uint8Array) {
    this.top = this.base
    this.inputLength = bytes.length
    this.inputAt = this.alloc(bytes.length + SENTINEL_BYTES)
    const memory = new Uint8Array(this.buffer)
    memory.set(bytes, this.inputAt)
    memory.fill(0, this.inputAt + bytes.length, this.inputAt + bytes.length + SENTINEL_BYTES)
  }

  /** The chunk's bytes as loaded (a fresh view once the memory has grown). */
  get input(): Uint8Array {
    if (this.inputView.buffer !== this.buffer || this.inputView.length !== this.inputLength)
      this.inputView = new Uint8Array(this.buffer, this.inputAt, this.inputLength)
    return this.inputView
  }

  /** `bytes` of memory for the current chunk; views made before may be stale after this. */
  alloc(bytes: number): number {
    const at = this.top
    this.top = Math.ceil((at + bytes) / ALIGN) * ALIGN
    const short = this.top - this.buffer.byteLength
    if (short > 0) this.wasm.memory.grow(Math.ceil(short / PAGE_BYTES))
    return at
  }

  copy(to: number, from: number, bytes: number) {
    new Uint8Array(this.buffer).copyWithin(to, from, from + bytes)
  }

  /** Where field `field`'s values go; see setField in assembly/plain-rows.ts. */
  bindField(field: number, kind: number, address: number, factor: number, max: number) {
    this.wasm.setField(field, kind, address, factor, max)
  }

  /** Whether `columns` are views of this memory (parsed here, not yet grouped). */
  holds(columns: StoredArray[]): boolean {
    return columns.length > 0 && columns.every((c) => c.buffer === this.buffer)
  }

  /**
   * Groups `columns` (views of this memory, as `holds` says) by tile on `grid`, x and y being
   * columns `xSlot` and `ySlot`; the grouped columns are copies the caller may keep.
   */
  group(columns: StoredArray[], grid: TileGrid, xSlot: number, ySlot: number): TileGroups {
    const rows = columns[0]!.length
    const tiles = grid.columns * grid.rows
    const addresses = columns.map((c) => c.byteOffset)
    const kinds = columns.map(kindOf)
    const keysAt = this.alloc(rows * 2)
    const startsAt = this.alloc((tiles + 1) * 4)
    const cursorAt = this.alloc(tiles * 4)
    const xRangesAt = this.alloc(tiles * 16)
    const yRangesAt = this.alloc(tiles * 16)
    const outAt = this.alloc(rows * 8)
    const { originX, originY } = grid
    const perNm = 1 / grid.tileSizeNm
    const [xAt, yAt] = [addresses[xSlot]!, addresses[ySlot]!]
    const outside = this.wasm.tileKeys(
      ...[xAt, yAt, rows, originX, originY, perNm, grid.columns, grid.rows],
      ...[keysAt, startsAt, xRangesAt, yRangesAt],
    )
    const memory = new Uint8Array(this.buffer)
    const stats: ColumnStats[] = []
    const grouped = columns.map((column, s) => {
      memory.copyWithin(cursorAt, startsAt, startsAt + tiles * 4)
      this.wasm.scatter(kinds[s]!, addresses[s]!, outAt, rows, keysAt, cursorAt)
      const missing = this.wasm.tallyOf(2)
      const [min, max] = [this.wasm.tallyOf(0), this.wasm.tallyOf(1)]
      stats.push({ count: rows - missing, missing, min, max })
      return copyOut(column, this.buffer, outAt, rows)
    })
    return {
      columns: grouped,
      stats,
      tileStarts: new Uint32Array(this.buffer.slice(startsAt, startsAt + (tiles + 1) * 4)),
      xRanges: new Float64Array(this.buffer.slice(xRangesAt, xRangesAt + tiles * 16)),
      yRanges: new Float64Array(this.buffer.slice(yRangesAt, yRangesAt + tiles * 16)),
      outside,
    }
  }

  /**
   * Stores the plain rows from offset `from` of the chunk as rows `row`, `row + 1`, … (at most
   * up to `capacity`); returns the offset where it stopped, with their number in `rows`.
   */
  parse(from: number, row: number, capacity: number): number {
    const end = this.inputAt + this.inputLength
    const at = this.wasm.parseRows(this.inputAt + from, end, row, capacity)
    this.rows = this.wasm.rowsParsed()
    return at - this.inputAt
  }
}

function kindOf(column: StoredArray): number {
  if (column instanceof Float32Array) return FIELD_KIND.float32
  if (column instanceof Float64Array) return FIELD_KIND.float64
  return column instanceof Uint32Array ? FIELD_KIND.uint32 : FIELD_KIND.uint16
}

/**
 * `rows` values of `like`'s type at `at` in `buffer`, copied into an array of their own. (Not
 * typed.loops' emptyLike: `like` was made before the memory last grew, so it may be detached,
 * its length 0.)
 */
function copyOut(like: StoredArray, buffer: ArrayBuffer, at: number, rows: number): StoredArray {
  const bytes = rows * like.BYTES_PER_ELEMENT
  const own = buffer.slice(at, at + bytes)
  if (like instanceof Float32Array) return new Float32Array(own)
  if (like instanceof Float64Array) return new Float64Array(own)
  return like instanceof Uint32Array ? new Uint32Array(own) : new Uint16Array(own)
}
