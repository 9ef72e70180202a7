/**
 * Worker thread entry: processes (parses and groups by tile) the chunks of the current ingest,
 * answering the messages of ingest.backends.ts, and hands the chunk and its columns back.
 */
import { parentPort } from 'node:worker_threads'
import { ChunkProcessor } from './chunk.processor'
import type { FromWorker, ToWorker } from './ingest.backends'

const port = parentPort
if (!port) throw new Error('parse.worker.ts runs as a worker thread')
let processor: ChunkProcessor | null = null

function answer(message: ToWorker) {
  if (message.type === 'begin') processor = new ChunkProcessor(message.plan)
  else if (message.type === 'end') processor = null
  else if (!processor) throw new Error('"process" before "begin"')
  else {
    const bytes = new Uint8Array(message.buffer, 0, message.length)
    const { summary, grouped } = processor.process(message.seq, bytes, message.grid)
    const reply: FromWorker = { type: 'processed', summary, grouped, buffer: message.buffer }
    const columns = grouped.columns.map((c) => c.buffer)
    const tiles = [grouped.tileStarts.buffer, grouped.xRanges.buffer, grouped.yRanges.buffer]
    port!.postMessage(reply, [message.buffer, ...columns, ...tiles])
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
