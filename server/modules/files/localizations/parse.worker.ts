/**
 * Worker thread entry: parses the chunks it is sent and keeps them until the ingest asks for them
 * grouped by tile. See ingest.backends.ts for the messages.
 */
import { parentPort, workerData } from 'node:worker_threads'
import { ChunkStore } from './chunk.store'
import type { ToWorker, FromWorker } from './ingest.backends'
import type { ParsePlan } from './parse-plan'

const port = parentPort
if (!port) throw new Error('parse.worker.ts runs as a worker thread')
const store = new ChunkStore((workerData as { plan: ParsePlan }).plan)

port.on('message', (message: ToWorker) => {
  try {
    if (message.type === 'parse') {
      const summary = store.parse(message.seq, new Uint8Array(message.buffer, 0, message.length))
      port.postMessage({ type: 'parsed', summary } satisfies FromWorker)
    } else {
      const result = store.group(message.grid)
      const buffers = result.chunks.flatMap((c) => [
        ...c.columns.map((a) => a.buffer),
        c.tileStarts.buffer,
      ])
      port.postMessage({ type: 'grouped', result } satisfies FromWorker, buffers)
    }
  } catch (error) {
    port.postMessage({
      type: 'failed',
      message: error instanceof Error ? (error.stack ?? error.message) : String(error),
    } satisfies FromWorker)
  }
})
