import { Writable } from 'node:stream'
import { Worker } from 'node:worker_threads'

interface Reply {
  seq: number
  bytes?: number
  /** A block sent for writing, handed back for reuse. */
  data?: ArrayBuffer
  digest?: string | null
  error?: string
}

// Kept apart from `new Worker(...)`: bundlers rewrite that pattern as a web worker import.
const WRITER_THREAD_URL = new URL('./upload-writer.worker.mjs', import.meta.url)

/** Bytes handed to the writer thread but not yet on disk; above this, the request stream waits. */
const MAX_OUTSTANDING = 64 * 1024 * 1024
/** The network delivers packets of up to 64 KiB; the thread gets them gathered into blocks of this size. */
const BLOCK_BYTES = 4 * 1024 * 1024

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
  private outstanding = 0
  private drained: (() => void)[] = []
  /** Empty blocks, back from the thread; at most as many as can be outstanding. */
  private readonly spare: ArrayBuffer[] = []
  /** Requests writing now; when the last one ends, the spare blocks are let go. */
  private writers = 0

  private takeBlock(): Uint8Array {
    return new Uint8Array(this.spare.pop() ?? new ArrayBuffer(BLOCK_BYTES))
  }

  private send(message: Record<string, unknown>, transfer: ArrayBuffer[] = []): Promise<Reply> {
    if (!this.worker) {
      this.worker = new Worker(WRITER_THREAD_URL)
      this.worker.unref()
      this.worker.on('message', (r: Reply) => this.reply(r))
      this.worker.on('error', (err) => this.failAll(err))
    }
    const seq = ++this.seq
    return new Promise((resolve, reject) => {
      this.waiting.set(seq, { resolve, reject })
      this.worker!.postMessage({ ...message, seq }, transfer)
    })
  }

  private reply(r: Reply) {
    const waiter = this.waiting.get(r.seq)
    this.waiting.delete(r.seq)
    if (r.data?.byteLength === BLOCK_BYTES && this.spare.length < MAX_OUTSTANDING / BLOCK_BYTES)
      this.spare.push(r.data)
    if (r.bytes) {
      this.outstanding -= r.bytes
      if (this.outstanding < MAX_OUTSTANDING) this.drained.splice(0).forEach((go) => go())
    }
    if (r.error) waiter?.reject(new Error(r.error))
    else waiter?.resolve(r)
  }

  private failAll(err: Error) {
    for (const w of this.waiting.values()) w.reject(err)
    this.waiting.clear()
    this.worker = null
    this.outstanding = 0
    this.drained.splice(0).forEach((go) => go())
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
    this.writers++
    let block = this.takeBlock()
    let used = 0
    let sent = position
    let written = 0
    let failure: Error | null = null
    // The thread answers in order, so the last block's answer means all before it are on disk.
    let last: Promise<unknown> = Promise.resolve()
    const send = () => {
      if (!used) return
      const full = used === BLOCK_BYTES
      // A full block is handed over as it is; a last, partial one is copied and the block kept.
      const data = (full ? block.buffer : block.slice(0, used).buffer) as ArrayBuffer
      const length = used
      this.outstanding += length
      last = this.send({ op: 'write', id, path, data, position: sent }, [data]).then(
        () => void (written += length),
        (err: Error) => void (failure ??= err),
      )
      sent += length
      if (full) block = this.takeBlock()
      used = 0
    }
    const settled = async () => {
      await last
      if (failure) throw failure
    }
    const stream = new Writable({
      highWaterMark: BLOCK_BYTES,
      write: (chunk: Buffer, _encoding, callback) => {
        if (failure) return callback(failure)
        for (let at = 0; at < chunk.length;) {
          const n = Math.min(chunk.length - at, BLOCK_BYTES - used)
          block.set(chunk.subarray(at, at + n), used)
          used += n
          at += n
          if (used === BLOCK_BYTES) send()
        }
        if (this.outstanding < MAX_OUTSTANDING) callback()
        else this.drained.push(() => callback())
      },
      final: (callback) => {
        send()
        this.spare.push(block.buffer as ArrayBuffer)
        settled().then(() => callback(), callback)
      },
      destroy: (err, callback) => {
        // Whatever arrived before an error still goes to disk, so the upload resumes after it.
        send()
        void this.close(id).catch(() => undefined)
        const ended = () => {
          if (--this.writers === 0) this.spare.length = 0
        }
        settled().then(
          () => (ended(), callback(err)),
          (writeErr: Error) => (ended(), callback(err ?? writeErr)),
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
