import { closeSync, fstatSync, openSync, readSync } from 'node:fs'

/** Directories and their values usually sit together, so one read of this size serves a whole IFD. */
const WINDOW_BYTES = 4096

/**
 * Small positional reads through one cached window. Reads are synchronous on purpose: an IFD
 * chain is thousands of dependent reads of a few hundred bytes, where a thread-pool hop per read
 * would cost more than the read itself. Callers yield to the event loop between batches.
 */
export class RandomAccessFile {
  private window: Buffer = Buffer.alloc(WINDOW_BYTES)
  private windowView = new DataView(
    this.window.buffer,
    this.window.byteOffset,
    this.window.byteLength,
  )
  private windowStart = 0
  private windowLength = 0

  private constructor(
    private readonly fd: number,
    readonly size: number,
  ) {}

  static open(path: string): RandomAccessFile {
    const fd = openSync(path, 'r')
    try {
      return new RandomAccessFile(fd, fstatSync(fd).size)
    } catch (error) {
      closeSync(fd)
      throw error
    }
  }

  /**
   * Bytes [position, position + length), or null when the file ends before them. The view is
   * only valid until the next call.
   */
  read(position: number, length: number): Buffer | null {
    const start = this.locate(position, length)
    return start < 0 ? null : this.window.subarray(start, start + length)
  }

  /**
   * Loads [position, position + length) into the window without allocating and returns where
   * it starts in `bytes`, or −1 when the file ends before. Valid until the next call.
   */
  locate(position: number, length: number): number {
    if (position < 0 || length < 0 || position + length > this.size) return -1
    const start = position - this.windowStart
    if (start >= 0 && start + length <= this.windowLength) return start
    const wanted = Math.min(Math.max(length, WINDOW_BYTES), this.size - position)
    if (wanted > this.window.length) {
      this.window = Buffer.alloc(wanted)
      this.windowView = new DataView(
        this.window.buffer,
        this.window.byteOffset,
        this.window.byteLength,
      )
    }
    this.windowStart = position
    this.windowLength = this.fill(position, wanted)
    return this.windowLength >= length ? 0 : -1
  }

  /** The window that `locate` indexes into. */
  get bytes(): Buffer {
    return this.window
  }

  /** The same window as a DataView, for fast integer reads. */
  get view(): DataView {
    return this.windowView
  }

  close(): void {
    closeSync(this.fd)
  }

  private fill(position: number, length: number): number {
    let filled = 0
    while (filled < length) {
      const got = readSync(this.fd, this.window, filled, length - filled, position + filled)
      if (got === 0) break
      filled += got
    }
    return filled
  }
}
