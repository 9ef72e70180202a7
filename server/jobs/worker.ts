import { parentPort, workerData } from 'node:worker_threads'
import type { JobMessage, JobRequest } from './job-protocol'
import { JOB_WORK } from './work'

/** Entry point of a job's worker thread: runs one job and reports progress and the outcome. */
async function run() {
  const { kind, payload } = workerData as JobRequest
  const post = (m: JobMessage) => parentPort?.postMessage(m)
  const work = JOB_WORK[kind]
  if (!work) return post({ type: 'failed', error: `No job of kind "${kind}".` })
  let last = 0
  try {
    const result = await work(payload, (fraction, message) => {
      const now = Date.now()
      // Progress is persisted by the runner; a few updates a second are plenty.
      if (now - last < 250 && fraction < 1) return
      last = now
      post({ type: 'progress', fraction: Math.max(0, Math.min(1, fraction)), message })
    })
    post({ type: 'done', result })
  } catch (err) {
    post({ type: 'failed', error: err instanceof Error ? err.message : String(err) })
  }
}

void run()
