/**
 * Drains an Arrow IPC writer into a file as it writes, with a bound on the bytes waiting, so a
 * table of any size passes through with a few tens of MB in flight.
 */
import { open } from 'node:fs/promises'
import type { RecordBatch, RecordBatchFileWriter } from 'apache-arrow'

const FLUSH_BYTES = 8 << 20
const MAX_WAITING_BYTES = 48 << 20

export class ArrowFileSink {
  private waiting = 0
  private written = 0
  private wake: (() => void) | null = null
  private readonly drained: Promise<void>

  constructor(
    private readonly writer: RecordBatchFileWriter,
    path: string,
  ) {
    this.drained = this.drain(path)
    this.drained.catch(() => this.wake?.())
  }

  /** Writes one batch; waits while too many bytes are still on their way to the disk. */
  async write(batch: RecordBatch) {
    this.writer.write(batch)
    this.waiting += batch.data.children.reduce((sum, c) => sum + (c.values?.byteLength ?? 0), 0)
    while (this.waiting > MAX_WAITING_BYTES) {
      await Promise.race([new Promise<void>((resolve) => (this.wake = resolve)), this.drained])
    }
  }

  /** Writes the footer and waits for the last byte; returns the file size. */
  async finish(): Promise<number> {
    this.writer.finish()
    this.writer.close()
    await this.drained
    return this.written
  }

  private async drain(path: string) {
    const file = await open(path, 'w')
    try {
      let pieces: Uint8Array[] = []
      let bytes = 0
      for await (const piece of this.writer) {
        pieces.push(piece)
        bytes += piece.byteLength
        if (bytes < FLUSH_BYTES) continue
        await this.flush(file, pieces, bytes)
        pieces = []
        bytes = 0
      }
      await this.flush(file, pieces, bytes)
    } finally {
      await file.close()
    }
  }

  private async flush(file: Awaited<ReturnType<typeof open>>, pieces: Uint8Array[], bytes: number) {
    if (pieces.length) await file.writev(pieces)
    this.written += bytes
    this.waiting = Math.max(0, this.waiting - bytes)
    this.wake?.()
    this.wake = null
  }
}
