import { Writable } from 'node:stream'
import type { Worker } from 'node:worker_threads'
import { startThread } from '../../threads'

interface Reply {
  seq: number
  bytes?: number
  digest?: string | null
  error?: string
}

// Plain JavaScript: the thread starts without loading tsx.
const WRITER_THREAD_URL = new URL('./upload-writer.worker.mjs', import.meta.url)

/** The network delivers packets of up to 64 KiB; the thread gets them gathered into blocks of this size. */
const BLOCK_BYTES = 4 * 1024 * 1024
/** Blocks handed to the writer thread but not yet on disk; with none free, the request stream waits. */
const BLOCKS = 16

/**
 * Memory shared with the writer thread, cut into blocks. A block is filled here, named to the
 * thread, and free again once it is on disk. Nothing is allocated or handed over per block:
 * moving buffers between threads counts as new memory each time, and that churn alone set off a
 * full garbage collection every hundred milliseconds or so during an upload.
 */
class BlockPool {
  readonly memory = new SharedArrayBuffer(BLOCKS * BLOCK_BYTES)
  private readonly free = Array.from({ length: BLOCKS }, (_, i) => BLOCKS - 1 - i)
  private readonly waiting: (() => void)[] = []

  take(): number | null {
    return this.free.pop() ?? null
  }

  give(block: number): void {
    this.free.push(block)
    this.waiting.shift()?.()
  }

  whenFree(go: () => void): void {
    this.waiting.push(go)
  }

  view(block: number): Uint8Array {
    return new Uint8Array(this.memory, block * BLOCK_BYTES, BLOCK_BYTES)
  }
}

export interface UploadWriter extends Writable {
  /** Bytes on disk (and hashed) so far. */
  readonly written: number
  /** Whether writing to disk failed; the thread then forgot the running hash. */
  readonly failed: boolean
}

/**
 * The request thread's side of the upload writer thread (upload-writer.worker.mjs): it writes
 * upload bytes to disk and keeps their running SHA-256 there, with back-pressure, so a slow disk
 * or hash never lets memory grow without bound.
 */
export class UploadWriterThread {
  private worker: Worker | null = null
  private seq = 0
  private readonly waiting = new Map<number, { resolve(r: Reply): void; reject(e: Error): void }>()
  /** While requests are writing; when the last one ends, the pool is let go. */
  private pool: BlockPool | null = null
  private writers = 0

  private send(message: Record<string, unknown>): Promise<Reply> {
    if (!this.worker) {
      this.worker = startThread(WRITER_THREAD_URL)
      this.worker.unref()
      this.worker.on('message', (r: Reply) => this.reply(r))
      this.worker.on('error', (err) => this.failAll(err))
      if (this.pool) this.worker.postMessage({ op: 'pool', buffer: this.pool.memory, seq: 0 })
    }
    const seq = ++this.seq
    return new Promise((resolve, reject) => {
      this.waiting.set(seq, { resolve, reject })
      this.worker!.postMessage({ ...message, seq })
    })
  }

  private reply(r: Reply) {
    const waiter = this.waiting.get(r.seq)
    this.waiting.delete(r.seq)
    if (r.error) waiter?.reject(new Error(r.error))
    else waiter?.resolve(r)
  }

  private failAll(err: Error) {
    for (const w of this.waiting.values()) w.reject(err)
    this.waiting.clear()
    this.worker = null
  }

  private startWriting(): BlockPool {
    this.writers++
    if (!this.pool) {
      this.pool = new BlockPool()
      void this.send({ op: 'pool', buffer: this.pool.memory }).catch(() => undefined)
    }
    return this.pool
  }

  private stopWriting(): void {
    if (--this.writers > 0 || !this.pool) return
    this.pool = null
    void this.send({ op: 'pool', buffer: null }).catch(() => undefined)
  }

  /** Starts (or restarts) the hash of an upload from the first `length` bytes of its file. */
  async rehash(id: string, path: string, length: number): Promise<void> {
    await this.send({ op: 'rehash', id, path, length })
  }

  /**
   * A stream that writes what it is given to the upload's file from `position` on (hashing it
   * too). It finishes once every byte is on disk.
   */
  writer(id: string, path: string, position: number): UploadWriter {
    const pool = this.startWriting()
    let block: number | null = null
    let used = 0
    let sent = position
    let written = 0
    let failure: Error | null = null
    // The thread answers in order, so the last block's answer means all before it are on disk.
    let last: Promise<unknown> = Promise.resolve()
    const send = () => {
      if (block === null) return
      const [full, length] = [block, used]
      block = null
      used = 0
      if (!length) return pool.give(full)
      last = this.send({
        op: 'write',
        id,
        path,
        offset: full * BLOCK_BYTES,
        length,
        position: sent,
      })
        .then(
          () => void (written += length),
          (err: Error) => void (failure ??= err),
        )
        .finally(() => pool.give(full))
      sent += length
    }
    const fill = (chunk: Buffer, from: number, callback: (err?: Error) => void): void => {
      if (failure) return callback(failure)
      for (let at = from; at < chunk.length;) {
        if (block === null) block = pool.take()
        // Every block is on its way to the disk: go on when one comes back.
        if (block === null) return pool.whenFree(() => fill(chunk, at, callback))
        const n = Math.min(chunk.length - at, BLOCK_BYTES - used)
        pool.view(block).set(chunk.subarray(at, at + n), used)
        used += n
        at += n
        if (used === BLOCK_BYTES) send()
      }
      callback()
    }
    const settled = async () => {
      await last
      if (failure) throw failure
    }
    let ended = false
    const end = () => {
      if (ended) return
      ended = true
      this.stopWriting()
    }
    const stream = new Writable({
      highWaterMark: BLOCK_BYTES,
      write: (chunk: Buffer, _encoding, callback) => fill(chunk, 0, callback),
      final: (callback) => {
        send()
        settled().then(
          () => (end(), callback()),
          (err: Error) => (end(), callback(err)),
        )
      },
      destroy: (err, callback) => {
        // Whatever arrived before an error still goes to disk, so the upload resumes after it.
        send()
        void this.close(id).catch(() => undefined)
        settled().then(
          () => (end(), callback(err)),
          (writeErr: Error) => (end(), callback(err ?? writeErr)),
        )
      },
    })
    return Object.defineProperties(stream, {
      written: { get: () => written },
      failed: { get: () => failure !== null },
    }) as UploadWriter
  }

  /** Closes the upload's file in the thread (after everything sent before). */
  async close(id: string): Promise<void> {
    await this.send({ op: 'close', id })
  }

  async digest(id: string): Promise<string | null> {
    return (await this.send({ op: 'digest', id })).digest ?? null
  }

  async drop(id: string): Promise<void> {
    await this.send({ op: 'drop', id })
  }

  async shutdown(): Promise<void> {
    await this.worker?.terminate()
    this.worker = null
  }
}
