/**
 * Where chunks are parsed: in this thread (small tables) or in worker threads, one per core. Both
 * answer the same two requests: parse a chunk (keep its columns, return a summary), and group
 * every kept chunk by tile.
 */
import { createRequire } from 'node:module'
import { pathToFileURL } from 'node:url'
import { Worker } from 'node:worker_threads'
import { ChunkStore, type ChunkSummary, type GroupResult } from './chunk.store'
import type { ParsePlan } from './parse-plan'
import type { TileGrid } from './tile.grid'

export type ToWorker =
  | { type: 'parse'; seq: number; buffer: ArrayBuffer; length: number }
  | { type: 'group'; grid: TileGrid }
export type FromWorker =
  | { type: 'parsed'; summary: ChunkSummary }
  | { type: 'grouped'; result: GroupResult }
  | { type: 'failed'; message: string }

export interface ParseBackend {
  /** Chunks sent and not yet answered. */
  readonly inFlight: number
  parse(seq: number, bytes: Uint8Array<ArrayBuffer>): Promise<ChunkSummary>
  group(grid: TileGrid): Promise<GroupResult>
  close(): Promise<void>
}

export class InlineBackend implements ParseBackend {
  readonly inFlight = 0
  private readonly store: ChunkStore
  constructor(plan: ParsePlan) {
    this.store = new ChunkStore(plan)
  }
  async parse(seq: number, bytes: Uint8Array<ArrayBuffer>) {
    return this.store.parse(seq, bytes)
  }
  async group(grid: TileGrid) {
    return this.store.group(grid)
  }
  async close() {}
}

/**
 * Loads the worker module. Node 20 does not pass the main thread's module hooks to workers, so a
 * TypeScript entry registers tsx in the worker first.
 */
const BOOTSTRAP = `
const { workerData } = require('node:worker_threads')
const ready = workerData.tsxApi ? import(workerData.tsxApi).then((tsx) => tsx.register()) : Promise.resolve()
ready.then(() => import(workerData.entry))`
const entry = new URL(
  `./parse.worker${import.meta.url.endsWith('.ts') ? '.ts' : '.js'}`,
  import.meta.url,
).href
/** tsx's ESM API (the package resolves its CommonJS twin for require). */
const tsxApi = entry.endsWith('.ts')
  ? pathToFileURL(
      createRequire(import.meta.url)
        .resolve('tsx/esm/api')
        .replace(/\.cjs$/, '.mjs'),
    ).href
  : null

interface Pending<T> {
  resolve: (value: T) => void
  reject: (error: Error) => void
}

export class WorkerBackend implements ParseBackend {
  private readonly worker: Worker
  private readonly parses = new Map<number, Pending<ChunkSummary>>()
  private grouping: Pending<GroupResult> | null = null
  private failure: Error | null = null
  private closed = false

  constructor(plan: ParsePlan) {
    this.worker = new Worker(BOOTSTRAP, { eval: true, workerData: { entry, tsxApi, plan } })
    this.worker.on('message', (message: FromWorker) => this.receive(message))
    this.worker.on('error', (error) => this.fail(error))
    this.worker.on('exit', (code) =>
      this.fail(new Error(`A parse worker stopped (exit code ${code})`)),
    )
  }

  get inFlight() {
    return this.parses.size
  }

  parse(seq: number, bytes: Uint8Array<ArrayBuffer>): Promise<ChunkSummary> {
    if (this.failure) return Promise.reject(this.failure)
    if (bytes.byteOffset !== 0) throw new Error('A chunk must start its buffer')
    const message: ToWorker = { type: 'parse', seq, buffer: bytes.buffer, length: bytes.length }
    this.worker.postMessage(message, [bytes.buffer])
    return new Promise((resolve, reject) => this.parses.set(seq, { resolve, reject }))
  }

  group(grid: TileGrid): Promise<GroupResult> {
    if (this.failure) return Promise.reject(this.failure)
    this.worker.postMessage({ type: 'group', grid } satisfies ToWorker)
    return new Promise((resolve, reject) => (this.grouping = { resolve, reject }))
  }

  async close() {
    this.closed = true
    await this.worker.terminate()
  }

  private receive(message: FromWorker) {
    if (message.type === 'parsed') {
      this.parses.get(message.summary.seq)?.resolve(message.summary)
      this.parses.delete(message.summary.seq)
    } else if (message.type === 'grouped') {
      this.grouping?.resolve(message.result)
      this.grouping = null
    } else this.fail(new Error(message.message))
  }

  private fail(error: Error) {
    if (this.closed || this.failure) return
    this.failure = error
    for (const pending of this.parses.values()) pending.reject(error)
    this.parses.clear()
    this.grouping?.reject(error)
  }
}
