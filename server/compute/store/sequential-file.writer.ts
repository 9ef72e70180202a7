/**
 * A file written front to back in large blocks, bypassing the page cache (O_DIRECT). Made only
 * where the file system takes direct I/O; should a write be refused later all the same, the rest
 * goes through the page cache.
 *
 * Why: a new store is written once and read later, and writing it through the page cache makes
 * the kernel find and fill a fresh page for every 4 KiB; on the virtual machines Stipple runs on
 * that costs CPU time on the writing thread (280 MB: ≈0.55 s of system time when the memory was
 * not touched recently, measured), while a direct write of the same bytes costs ≈0.05 s of CPU
 * and leaves the waiting to the disk. Direct I/O needs block-aligned memory, offsets and lengths:
 * the blocks are staged in WebAssembly memory (page-aligned by construction) and the last one is
 * padded, then the file is cut to its length. Through the page cache, writing the file front to
 * back from one thread is slower than scattered writes from several (measured), so a file system
 * without direct I/O gets the caller's other writer rather than this one.
 */
import { constants } from 'node:fs'
import { open, type FileHandle } from 'node:fs/promises'

/** Bytes per write: large enough for the disk's full speed, small enough to stage cheaply. */
export const BLOCK_BYTES = 4 << 20
/** Blocks in the ring: one filling while the others are on their way to disk (2–4 measured alike). */
const BLOCKS = 2
/** Direct I/O's alignment: the largest logical block size in use (4 KiB). */
const ALIGN = 4096
const WASM_PAGE = 65536

export class SequentialFile {
  private readonly writes: (Promise<void> | null)[] = Array.from({ length: BLOCKS }, () => null)
  private readonly blocks: Uint8Array[]
  private current = 0
  private filled = 0
  /** File offset of the current block. */
  private position = 0

  private constructor(
    private file: FileHandle,
    private direct: boolean,
    private readonly path: string,
  ) {
    const memory = new WebAssembly.Memory({ initial: (BLOCKS * BLOCK_BYTES) / WASM_PAGE })
    this.blocks = this.writes.map(
      (_, i) => new Uint8Array(memory.buffer, i * BLOCK_BYTES, BLOCK_BYTES),
    )
  }

  /**
   * Creates (or empties) the file at `path` for direct writes; null where the platform or the
   * file system refuses direct I/O at open, so the caller writes its own way.
   */
  static async createDirect(path: string): Promise<SequentialFile | null> {
    if (constants.O_DIRECT === undefined) return null
    const flags = constants.O_WRONLY | constants.O_CREAT | constants.O_TRUNC | constants.O_DIRECT
    try {
      return new SequentialFile(await open(path, flags), true, path)
    } catch (error) {
      if ((error as NodeJS.ErrnoException).code === 'EINVAL') return null
      throw error
    }
  }

  /** Bytes appended so far. */
  get size() {
    return this.position + this.filled
  }

  /** Whether the file is being written around the page cache. */
  get isDirect() {
    return this.direct
  }

  /**
   * Appends the values' bytes, or, for `into: 'uint8'`, the values themselves narrowed to one byte
   * each (a Uint16Array of values below 256 written as a Uint8 column).
   */
  async append(values: ArrayBufferView, into?: 'uint8'): Promise<void> {
    const narrow = into === 'uint8'
    const source = narrow
      ? (values as Uint16Array)
      : new Uint8Array(values.buffer, values.byteOffset, values.byteLength)
    let from = 0
    while (from < source.length) {
      const block = this.blocks[this.current]!
      const n = Math.min(source.length - from, BLOCK_BYTES - this.filled)
      block.set(source.subarray(from, from + n), this.filled)
      this.filled += n
      from += n
      if (this.filled === BLOCK_BYTES) await this.flush()
    }
  }

  /** Writes what is staged, cuts the file to its length and closes it; returns the length. */
  async close(): Promise<number> {
    try {
      const size = this.size
      if (this.filled > 0) {
        // Direct writes cover whole blocks: pad with zeros, then cut the file back.
        const padded = Math.ceil(this.filled / ALIGN) * ALIGN
        this.blocks[this.current]!.fill(0, this.filled, padded)
        this.filled = padded
        await this.flush()
      }
      await Promise.all(this.writes)
      await this.file.truncate(size)
      return size
    } finally {
      await this.abandon()
    }
  }

  /** Closes the file without finishing it (after a failure); what was written stays. */
  async abandon(): Promise<void> {
    await Promise.allSettled(this.writes)
    await Promise.allSettled([this.file, ...this.retired].map((f) => f.close()))
    this.retired.length = 0
  }

  /** Sends the current block and turns to the next one, once that one's write has landed. */
  private async flush() {
    const i = this.current
    const write = this.write(this.blocks[i]!.subarray(0, this.filled), this.position)
    // Awaited when its block is wanted again (or at close); a failure before then is not unhandled.
    write.catch(() => undefined)
    this.writes[i] = write
    this.position += this.filled
    this.filled = 0
    this.current = (i + 1) % BLOCKS
    await this.writes[this.current]
    this.writes[this.current] = null
  }

  private async write(bytes: Uint8Array, at: number): Promise<void> {
    let done = 0
    while (done < bytes.length) {
      const file = this.file
      try {
        done += (await file.write(bytes, done, bytes.length - done, at + done)).bytesWritten
      } catch (error) {
        // A file system that took O_DIRECT at open but refuses the write (or a short direct
        // write left the rest unaligned): go on buffered, from where this write stopped.
        if (!this.direct && file === this.file) throw error
        if ((error as NodeJS.ErrnoException).code !== 'EINVAL') throw error
        await this.reopenBuffered()
      }
    }
  }

  /** Handles replaced by a buffered one, closed at the end (a write may still be using them). */
  private readonly retired: FileHandle[] = []
  private reopening: Promise<void> | null = null

  private reopenBuffered() {
    this.reopening ??= (async () => {
      this.retired.push(this.file)
      this.file = await open(this.path, constants.O_WRONLY)
      this.direct = false
    })()
    return this.reopening
  }
}
