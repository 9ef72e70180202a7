import { Worker } from 'node:worker_threads'

interface Reply {
  seq: number
  bytes?: number
  digest?: string | null
  error?: string
}

// Kept apart from `new Worker(...)`: bundlers rewrite that pattern as a web worker import.
const HASH_THREAD_URL = new URL('./sha256.worker.mjs', import.meta.url)

/** Bytes handed to the hashing thread but not yet hashed; above this, the request stream waits. */
const MAX_OUTSTANDING = 64 * 1024 * 1024
const BLOCK_BYTES = 4 * 1024 * 1024

/**
 * The request thread's side of the hashing thread: running SHA-256 states keyed by upload id,
 * fed with copies of the chunks as they stream to disk, with back-pressure so a slow hash never
 * lets memory grow without bound.
 */
export class HashThread {
  private worker: Worker | null = null
  private seq = 0
  private readonly waiting = new Map<number, { resolve(r: Reply): void; reject(e: Error): void }>()
  private outstanding = 0
  private drained: (() => void)[] = []

  private send(message: Record<string, unknown>, transfer: ArrayBuffer[] = []): Promise<Reply> {
    if (!this.worker) {
      this.worker = new Worker(HASH_THREAD_URL)
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

  /** Chunks copied into blocks of a few MB, so the thread gets few, large messages. */
  private readonly blocks = new Map<string, { buffer: Uint8Array; used: number }>()

  /** Queues a copy of the chunk for hashing; resolves when there is room for more. */
  async update(id: string, chunk: Buffer): Promise<void> {
    let block = this.blocks.get(id)
    let at = 0
    while (at < chunk.length) {
      if (!block) this.blocks.set(id, (block = { buffer: new Uint8Array(BLOCK_BYTES), used: 0 }))
      const n = Math.min(chunk.length - at, BLOCK_BYTES - block.used)
      block.buffer.set(chunk.subarray(at, at + n), block.used)
      block.used += n
      at += n
      if (block.used === BLOCK_BYTES) {
        this.flush(id)
        block = undefined
      }
    }
    if (this.outstanding >= MAX_OUTSTANDING) await new Promise<void>((go) => this.drained.push(go))
  }

  /** Sends what is buffered for an upload (before a digest, or at the end of a request). */
  flush(id: string): void {
    const block = this.blocks.get(id)
    this.blocks.delete(id)
    if (!block?.used) return
    const data = block.used === BLOCK_BYTES ? block.buffer.buffer : block.buffer.slice(0, block.used).buffer
    this.outstanding += block.used
    void this.send({ op: 'update', id, data }, [data as ArrayBuffer]).catch(() => undefined)
  }

  async digest(id: string): Promise<string | null> {
    this.flush(id)
    return (await this.send({ op: 'digest', id })).digest ?? null
  }

  async drop(id: string): Promise<void> {
    this.blocks.delete(id)
    await this.send({ op: 'drop', id })
  }

  async close(): Promise<void> {
    await this.worker?.terminate()
    this.worker = null
  }
}
