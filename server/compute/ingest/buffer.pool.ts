/**
 * Chunk buffers handed back by the parsers for the reader to fill again: the text passes through
 * a few buffers instead of one fresh allocation per chunk, which workers would free only at their
 * next garbage collection.
 */
const SLACK = 64 << 10

export class BufferPool {
  private readonly free: ArrayBuffer[] = []

  constructor(private readonly keep = 8) {}

  /** A buffer of at least `size` bytes (not zeroed). */
  take(size: number): ArrayBuffer {
    const i = this.free.findIndex((b) => b.byteLength >= size)
    return i >= 0 ? this.free.splice(i, 1)[0]! : new ArrayBuffer(size + SLACK)
  }

  give(buffer: ArrayBuffer) {
    if (this.free.length < this.keep && buffer.byteLength > 0) this.free.push(buffer)
  }
}
