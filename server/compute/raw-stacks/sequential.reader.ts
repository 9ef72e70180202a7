import { type FileHandle, open } from 'node:fs/promises'

/** Large reads keep the disk streaming; 8 MiB is many frames of a typical camera. */
export const DEFAULT_CHUNK_BYTES = 8 * 2 ** 20

/**
 * Serves byte ranges of a file that is read front to back, with one large read per chunk
 * instead of one per strip. Memory stays at one chunk (or one strip, if a strip is larger).
 */
export class SequentialReader {
  private buffer: Buffer
  private start = 0
  private length = 0
  /** Bytes read from disk so far. */
  bytesRead = 0

  private constructor(
    private readonly handle: FileHandle,
    readonly size: number,
    chunkBytes: number,
  ) {
    this.buffer = Buffer.allocUnsafe(Math.max(1, Math.min(chunkBytes, size)))
  }

  static async open(path: string, chunkBytes = DEFAULT_CHUNK_BYTES): Promise<SequentialReader> {
    const handle = await open(path, 'r')
    try {
      return new SequentialReader(handle, (await handle.stat()).size, chunkBytes)
    } catch (error) {
      await handle.close()
      throw error
    }
  }

  /** The bytes when they are already in the chunk (no await needed), else undefined. */
  peek(position: number, length: number): Buffer | undefined {
    const at = position - this.start
    return at >= 0 && at + length <= this.length ? this.buffer.subarray(at, at + length) : undefined
  }

  /** Bytes [position, position + length), or null past the end; valid until the next call. */
  async read(position: number, length: number): Promise<Buffer | null> {
    if (position < 0 || position + length > this.size) return null
    const at = position - this.start
    if (at >= 0 && at + length <= this.length) return this.buffer.subarray(at, at + length)
    if (length > this.buffer.length) this.grow(length)
    // Keep the part of the chunk already read that the request starts in, then read on from there.
    const kept = at >= 0 && at < this.length ? this.length - at : 0
    if (kept > 0) this.buffer.copyWithin(0, at, this.length)
    this.start = position
    this.length = kept + (await this.fill(kept, Math.min(this.buffer.length, this.size - position)))
    return this.length >= length ? this.buffer.subarray(0, length) : null
  }

  async close(): Promise<void> {
    await this.handle.close()
  }

  private grow(length: number) {
    const bigger = Buffer.allocUnsafe(length)
    this.buffer.copy(bigger, 0, 0, this.length)
    this.buffer = bigger
  }

  private async fill(from: number, to: number): Promise<number> {
    let filled = from
    while (filled < to) {
      const { bytesRead } = await this.handle.read(
        this.buffer,
        filled,
        to - filled,
        this.start + filled,
      )
      if (bytesRead === 0) break
      filled += bytesRead
    }
    this.bytesRead += filled - from
    return filled - from
  }
}
