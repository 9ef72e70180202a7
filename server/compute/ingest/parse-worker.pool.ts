/**
 * Chunk workers, kept per thread between ingests: starting one costs a few hundred ms (it loads
 * tsx to read our TypeScript), more than parsing a small table. Idle workers are unreferenced, so
 * they never keep the process alive, and stop after five idle minutes.
 */
import type { Worker } from 'node:worker_threads'
import { startThread } from '../../threads'
import type { ChunkBackend, FromWorker, Processed, ToWorker } from './ingest.backends'
import type { ParsePlan } from './parse-plan'
import type { TileGrid } from '../store/tile.grid'

const IDLE_MS = 5 * 60_000
const ENTRY = new URL('./parse.worker.ts', import.meta.url)

interface Pending {
  resolve: (value: Processed) => void
  reject: (error: Error) => void
}

export class ParseWorker implements ChunkBackend {
  ready = false
  failure: Error | null = null
  private readonly worker: Worker = startThread(ENTRY)
  private readonly pending = new Map<number, Pending>()
  private idleTimer: NodeJS.Timeout | null = null

  constructor() {
    this.worker.on('message', (message: FromWorker) => this.receive(message))
    this.worker.on('error', (error) => this.fail(error))
    this.worker.on('exit', (code) =>
      this.fail(new Error(`A parse worker stopped (exit code ${code})`)),
    )
  }

  get inFlight() {
    return this.pending.size
  }

  begin(plan: ParsePlan) {
    if (this.idleTimer) clearTimeout(this.idleTimer)
    this.worker.ref()
    this.send({ type: 'begin', plan })
  }

  /** Idle in the pool from the start (for prestarting). */
  park() {
    this.worker.unref()
    this.idleTimer = setTimeout(() => this.stop(), IDLE_MS).unref()
    idle.push(this)
  }

  process(seq: number, bytes: Uint8Array<ArrayBuffer>, grid: TileGrid): Promise<Processed> {
    if (this.failure) return Promise.reject(this.failure)
    if (bytes.byteOffset !== 0) throw new Error('A chunk must start its buffer')
    this.send({ type: 'process', seq, buffer: bytes.buffer, length: bytes.length, grid }, [
      bytes.buffer,
    ])
    return new Promise((resolve, reject) => this.pending.set(seq, { resolve, reject }))
  }

  /** Back to the pool (after a clean ingest) or gone (after a failed one). */
  release() {
    if (this.failure || this.inFlight > 0) return void this.stop()
    this.send({ type: 'end' })
    this.park()
  }

  private send(message: ToWorker, transfer: ArrayBuffer[] = []) {
    this.worker.postMessage(message, transfer)
  }

  private stop() {
    const i = idle.indexOf(this)
    if (i >= 0) idle.splice(i, 1)
    this.failure ??= new Error('The parse worker was stopped')
    void this.worker.terminate()
  }

  private receive(message: FromWorker) {
    if (message.type === 'ready') this.ready = true
    else if (message.type === 'processed') {
      this.pending.get(message.summary.seq)?.resolve(message)
      this.pending.delete(message.summary.seq)
    } else this.fail(new Error(message.message))
  }

  private fail(error: Error) {
    if (this.failure) return
    this.failure = error
    for (const pending of this.pending.values()) pending.reject(error)
    this.pending.clear()
    this.stop()
  }
}

const idle: ParseWorker[] = []

/** `count` workers for one ingest, started with its plan; idle ones first. */
export function acquireParseWorkers(count: number, plan: ParsePlan): ParseWorker[] {
  const workers = idle.splice(0, count)
  while (workers.length < count) workers.push(new ParseWorker())
  for (const worker of workers) worker.begin(plan)
  return workers
}

/**
 * Starts workers ahead of the first ingest (a job runner can call this when it starts), so that
 * ingest does not wait for them to load. Returns how many are idle in the pool.
 */
export function prestartParseWorkers(count: number): number {
  while (idle.length < count) new ParseWorker().park()
  return idle.length
}
