import { Worker, type WorkerOptions } from 'node:worker_threads'

/**
 * Worker threads, started one way: the shared bootstrap registers tsx where the entry is
 * TypeScript and loads it. `entry` is the module's URL (`new URL('./x.worker.ts', import.meta.url)`).
 */
const BOOTSTRAP = new URL('./thread-bootstrap.mjs', import.meta.url)

type Data = Record<string, unknown>

export function startThread(
  entry: URL,
  options: WorkerOptions & { workerData?: Data } = {},
): Worker {
  // workerData stays an object: geotiff's web-worker shim reads fields of it when loaded in a thread.
  return new Worker(BOOTSTRAP, {
    ...options,
    workerData: { ...options.workerData, entry: entry.href },
  })
}

/** The options a Piscina pool needs to run `entry`'s default export through the same bootstrap. */
export function poolEntry(entry: URL, workerData: Data = {}) {
  return { filename: BOOTSTRAP.href, workerData: { ...workerData, entry: entry.href } }
}
