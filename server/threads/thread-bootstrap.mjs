// The one entry every thread of ours starts from. Node 20 does not pass the main thread's module
// hooks to worker threads, so a TypeScript entry registers tsx first; then the entry named in
// workerData loads, and its default export is handed on (Piscina calls it per task).
import { workerData } from 'node:worker_threads'

const entry = workerData?.entry
if (typeof entry !== 'string') throw new Error('thread-bootstrap: workerData.entry is missing')
if (entry.endsWith('.ts')) (await import('tsx/esm/api')).register()
const module = await import(entry)
export default module.default
