/**
 * Worker thread entry: keeps the chunks of the current ingest and answers the messages of
 * ingest.backends.ts (begin, parse, count, scatter, end).
 */
import { parentPort } from 'node:worker_threads'
import { ChunkStore } from './chunk.store'
import type { FromWorker, ToWorker } from './ingest.backends'

const port = parentPort
if (!port) throw new Error('parse.worker.ts runs as a worker thread')
let store: ChunkStore | null = null

function answer(message: ToWorker) {
  if (message.type === 'begin') store = new ChunkStore(message.plan)
  else if (message.type === 'end') store = null
  else if (!store) throw new Error(`"${message.type}" before "begin"`)
  else if (message.type === 'parse') {
    const summary = store.parse(message.seq, new Uint8Array(message.buffer, 0, message.length))
    const reply: FromWorker = { type: 'parsed', summary, buffer: message.buffer }
    port!.postMessage(reply, [message.buffer])
  } else if (message.type === 'count') {
    port!.postMessage({ type: 'counted', chunks: store.count(message.grid) } satisfies FromWorker)
  } else {
    const scattered = store.scatter(message.request)
    port!.postMessage({ type: 'scattered', scattered } satisfies FromWorker)
  }
}

port.on('message', (message: ToWorker) => {
  try {
    answer(message)
  } catch (error) {
    const text = error instanceof Error ? (error.stack ?? error.message) : String(error)
    port.postMessage({ type: 'failed', message: text } satisfies FromWorker)
  }
})
port.postMessage({ type: 'ready' } satisfies FromWorker)
