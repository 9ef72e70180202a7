import { parentPort, workerData } from 'node:worker_threads'
import { LocalStorage } from '../storage/local-storage'
import type { StorageConfig } from '../storage/storage-config'
import type { JobMessage, JobRequest } from './job-protocol'
import { JOB_WORK } from './work'

const given = workerData as { dataDir?: string; storage?: StorageConfig }

/**
 * Where bytes live, from the runner: every path a job touches is resolved here from keys. The
 * bucket's client is loaded only on the S3 profile: the embedded default's threads start without it.
 */
async function openStorage(): Promise<LocalStorage> {
  const dataDir = String(given.dataDir ?? 'data')
  if (given.storage?.kind !== 's3') return new LocalStorage(dataDir)
  const { S3ObjectStore } = await import('../storage/s3-object-store')
  return new LocalStorage(dataDir, new S3ObjectStore(given.storage))
}
const storage = openStorage()

/**
 * A long-lived job worker thread: it loads the heavy modules once and then runs one job at a time
 * as the runner sends them, reporting progress and the outcome.
 */
async function run({ id, kind, payload }: JobRequest & { id: number }) {
  const post = (m: JobMessage) => parentPort?.postMessage({ id, ...m })
  const work = JOB_WORK[kind]
  if (!work) return post({ type: 'failed', error: `No job of kind "${kind}".` })
  let last = 0
  try {
    const result = await work(payload, {
      storage: await storage,
      progress: (fraction, message) => {
        const now = Date.now()
        // Progress is persisted by the runner; a few updates a second are plenty.
        if (now - last < 250 && fraction < 1) return
        last = now
        post({ type: 'progress', fraction: Math.max(0, Math.min(1, fraction)), message })
      },
    })
    post({ type: 'done', result })
  } catch (err) {
    post({ type: 'failed', error: err instanceof Error ? err.message : String(err) })
  }
}

parentPort?.on('message', (request: JobRequest & { id: number }) => void run(request))
parentPort?.postMessage({ type: 'ready' })
