/**
 * Holding the parsed table within a memory budget. The store is tile-ordered, so no tile can be
 * written before the last chunk is parsed: every chunk's columns wait until then. Up to the budget
 * they wait in memory (a 10-million-row table, ~280 MB, stays there); past it, a chunk's columns
 * go to a spill file beside the output and only its tile layout stays in memory, so a table of
 * hundreds of millions of rows is converted in bounded memory. The spill file is removed when the
 * ingest ends, whatever the outcome.
 */
import { open, rm, type FileHandle } from 'node:fs/promises'
import type { GroupedChunk, TileLayout } from './chunk.processor'
import type { StoredArray } from './stored-array'

/** A chunk whose columns wait in the spill file. */
export interface SpilledChunk extends TileLayout {
  spilled: SpilledColumn[]
  rows: number
}

interface SpilledColumn {
  offset: number
  /** Rebuilds the stored array class over read-back bytes. */
  make: (buffer: ArrayBuffer, byteOffset: number, length: number) => StoredArray
  bytesPerValue: number
  /** Subtracted from every value when read back (a 1-based frame column settled to 0-based). */
  shift: number
}

export type HeldChunk = GroupedChunk | SpilledChunk

export const isSpilled = (chunk: HeldChunk): chunk is SpilledChunk => 'spilled' in chunk

/** The rows a held chunk has. */
export const rowsOf = (chunk: HeldChunk) =>
  isSpilled(chunk) ? chunk.rows : (chunk.columns[0]?.length ?? 0)

const bytesOf = (chunk: GroupedChunk) => chunk.columns.reduce((n, c) => n + c.byteLength, 0)

export class ChunkSpill {
  private held = 0
  private end = 0
  private file: Promise<FileHandle> | null = null
  private readonly writes = new Set<Promise<unknown>>()
  private failure: unknown = null
  /** Bytes written to the spill file, for the report and the tests. */
  spilledBytes = 0

  constructor(
    private readonly path: string,
    private readonly budgetBytes: number,
  ) {}

  /** The chunk itself while the budget allows; else its place in the spill file (written now). */
  keep(chunk: GroupedChunk): HeldChunk {
    const bytes = bytesOf(chunk)
    if (this.held + bytes <= this.budgetBytes) {
      this.held += bytes
      return chunk
    }
    const spilled: SpilledColumn[] = chunk.columns.map((column) => {
      const offset = this.end
      this.end += column.byteLength
      return { offset, make: maker(column), bytesPerValue: column.BYTES_PER_ELEMENT, shift: 0 }
    })
    const views = chunk.columns.map((c) => new Uint8Array(c.buffer, c.byteOffset, c.byteLength))
    this.track(this.handle().then((file) => file.writev(views, spilled[0]?.offset ?? 0)))
    this.spilledBytes += bytes
    const { columns, ...layout } = chunk
    return { ...layout, spilled, rows: columns[0]?.length ?? 0 }
  }

  /** Waits for every spill write; throws the first that failed. */
  async settled() {
    await Promise.all(this.writes)
    if (this.failure) throw this.failure
  }

  /** The chunk's columns back in memory (to regroup it on another grid). */
  async load(chunk: SpilledChunk): Promise<GroupedChunk> {
    await this.settled()
    const file = await this.handle()
    const columns = await Promise.all(
      chunk.spilled.map(async (column) => {
        const bytes = new Uint8Array(chunk.rows * column.bytesPerValue)
        await readFully(file, bytes, column.offset)
        const values = column.make(bytes.buffer, 0, chunk.rows)
        if (column.shift) for (let i = 0; i < values.length; i++) values[i]! -= column.shift
        return values
      }),
    )
    const { spilled: _columns, rows: _rows, ...layout } = chunk
    return { ...layout, columns }
  }

  /**
   * Rows [from, to) of column `c` of a spilled chunk, into `into` (a view of the stored class
   * with room for them), shifted as settled.
   */
  async readRows(chunk: SpilledChunk, c: number, from: number, to: number, into: StoredArray) {
    const column = chunk.spilled[c]!
    const bytes = new Uint8Array(into.buffer, into.byteOffset, (to - from) * column.bytesPerValue)
    await readFully(await this.handle(), bytes, column.offset + from * column.bytesPerValue)
    if (column.shift) for (let i = 0; i < to - from; i++) into[i]! -= column.shift
  }

  async close() {
    await Promise.allSettled(this.writes)
    const file = this.file
    this.file = null
    if (file) await (await file.catch(() => null))?.close()
    await rm(this.path, { force: true })
  }

  private handle() {
    this.file ??= rm(this.path, { force: true }).then(() => open(this.path, 'w+'))
    return this.file
  }

  private track(write: Promise<unknown>) {
    this.writes.add(write)
    void write
      .catch((error: unknown) => void (this.failure ??= error))
      .finally(() => this.writes.delete(write))
  }
}

function maker(column: StoredArray): SpilledColumn['make'] {
  const Make = column.constructor as new (b: ArrayBuffer, o: number, n: number) => StoredArray
  return (buffer, byteOffset, length) => new Make(buffer, byteOffset, length)
}

async function readFully(file: FileHandle, into: Uint8Array, position: number) {
  let done = 0
  while (done < into.length) {
    const { bytesRead } = await file.read(into, done, into.length - done, position + done)
    if (bytesRead === 0) throw new Error('The spill file ended early')
    done += bytesRead
  }
}
