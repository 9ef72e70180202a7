// The one entry every thread of ours starts from. A TypeScript entry is loaded as its compiled
// bundle (thread-bundle.mjs); should that fail (a read-only installation, say), tsx is registered
// instead, as Node 20 does not pass the main thread's module hooks to worker threads. Then the
// entry loads, and its default export is handed on (Piscina calls it per task).
import { workerData } from 'node:worker_threads'

const entry = workerData?.entry
if (typeof entry !== 'string') throw new Error('thread-bootstrap: workerData.entry is missing')

async function loadable(href) {
  if (!href.endsWith('.ts')) return href
  try {
    return await (await import('./thread-bundle.mjs')).bundledEntry(href)
  } catch (error) {
    process.emitWarning(`Thread entry ${href} runs through tsx: ${error.message}`)
    ;(await import('tsx/esm/api')).register()
    return href
  }
}

const module = await import(await loadable(entry))
export default module.default
