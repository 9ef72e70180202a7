/**
 * The chunk parser's WebAssembly fast path (assembly/plain-rows.ts) and the linear memory it
 * shares with the parser: each chunk's bytes are copied there, and the slot columns live there
 * too (slot.columns.ts allocates them through `alloc`), so rows the fast path stores and rows the
 * TypeScript parser stores land in the same arrays. One instance, and one memory, per parser.
 */
import type { ParsePlan } from './parse-plan'
import { PLAIN_ROWS_WASM } from './plain-rows.wasm'

interface PlainRowsExports {
  memory: WebAssembly.Memory
  MAX_FIELDS: WebAssembly.Global
  dataStart(): number
  setFormat(fields: number, delimiter: number, decimalMark: number): void
  setField(field: number, kind: number, address: number, factor: number, max: number): void
  rowsParsed(): number
  parseRows(at: number, end: number, row: number, capacity: number): number
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
