/**
 * Parse workers, kept per thread between ingests: starting one costs a few hundred ms (it loads
 * tsx to read our TypeScript), more than parsing a small table. Idle workers are unreferenced, so
 * they never keep the process alive, and stop after a minute.
 */
import { createRequire } from 'node:module'
import { pathToFileURL } from 'node:url'
import { Worker } from 'node:worker_threads'
import type { ChunkCounts, ScatterRequest, Scattered } from './chunk.store'
import type { FromWorker, ParseBackend, Parsed, ToWorker } from './ingest.backends'
import type { ParsePlan } from './parse-plan'
import type { TileGrid } from './tile.grid'

const IDLE_MS = 60_000

/** Node 20 does not pass module hooks to workers: a TypeScript entry registers tsx first. */
const BOOTSTRAP = `
const { workerData } = require('node:worker_threads')
const ready = workerData.tsxApi ? import(workerData.tsxApi).then((tsx) => tsx.register()) : Promise.resolve()
ready.then(() => import(workerData.entry))`
const entry = new URL(
  `./parse.worker${import.meta.url.endsWith('.ts') ? '.ts' : '.js'}`,
  import.meta.url,
).href
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

export class ParseWorker implements ParseBackend {
  ready = false
  failure: Error | null = null
  private readonly worker = new Worker(BOOTSTRAP, { eval: true, workerData: { entry, tsxApi } })
  private readonly parses = new Map<number, Pending<Parsed>>()
  /** The one count or scatter request in flight. */
  private request: Pending<unknown> | null = null
  private idleTimer: NodeJS.Timeout | null = null

  constructor() {
    this.worker.on('message', (message: FromWorker) => this.receive(message))
    this.worker.on('error', (error) => this.fail(error))
    this.worker.on('exit', (code) =>
      this.fail(new Error(`A parse worker stopped (exit code ${code})`)),
    )
  }

  get inFlight() {
    return this.parses.size
  }

  begin(plan: ParsePlan) {
    if (this.idleTimer) clearTimeout(this.idleTimer)
    this.worker.ref()
    this.send({ type: 'begin', plan })
  }

  parse(seq: number, bytes: Uint8Array<ArrayBuffer>): Promise<Parsed> {
    if (this.failure) return Promise.reject(this.failure)
    if (bytes.byteOffset !== 0) throw new Error('A chunk must start its buffer')
    this.send({ type: 'parse', seq, buffer: bytes.buffer, length: bytes.length }, [bytes.buffer])
    return new Promise((resolve, reject) => this.parses.set(seq, { resolve, reject }))
  }

  count(grid: TileGrid): Promise<ChunkCounts[]> {
    return this.ask<ChunkCounts[]>({ type: 'count', grid })
  }

  scatter(request: ScatterRequest): Promise<Scattered> {
    return this.ask<Scattered>({ type: 'scatter', request })
  }

  private ask<T>(message: ToWorker): Promise<T> {
    if (this.failure) return Promise.reject(this.failure)
    this.send(message)
    return new Promise<T>((resolve, reject) => {
      this.request = { resolve: (value) => resolve(value as T), reject }
    })
  }

  /** Back to the pool (after a clean ingest) or gone (after a failed one). */
  release() {
    if (this.failure || this.inFlight > 0 || this.request) return void this.stop()
    this.send({ type: 'end' })
    this.worker.unref()
    this.idleTimer = setTimeout(() => this.stop(), IDLE_MS).unref()
    idle.push(this)
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
    else if (message.type === 'parsed') {
      this.parses.get(message.summary.seq)?.resolve(message)
      this.parses.delete(message.summary.seq)
    } else if (message.type === 'counted' || message.type === 'scattered') {
      const request = this.request
      this.request = null
      request?.resolve(message.type === 'counted' ? message.chunks : message.scattered)
    } else this.fail(new Error(message.message))
  }

  private fail(error: Error) {
    if (this.failure) return
    this.failure = error
    for (const pending of this.parses.values()) pending.reject(error)
    this.parses.clear()
    this.request?.reject(error)
    this.request = null
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
