/**
 * Sends chunks to the parse workers as they are read, at most a couple waiting per worker, so
 * reading, decompressing and parsing overlap while memory stays bounded. Until a worker has
 * started (a few hundred ms), this thread parses the chunks itself.
 */
import type { TableChunk } from './chunk.reader'
import type { ChunkSummary } from './chunk.store'
import type { BufferPool } from './buffer.pool'
import type { ParseBackend } from './ingest.backends'

const MAX_IN_FLIGHT = 2

export async function parseChunks(
  chunks: AsyncIterable<TableChunk>,
  backends: { inline: ParseBackend; workers: ParseBackend[] },
  buffers: BufferPool,
  onParsed: (readFraction: number) => void,
): Promise<ChunkSummary[]> {
  const summaries: ChunkSummary[] = []
  const running = new Set<Promise<void>>()
  let failure: unknown = null
  let seq = 0
  for await (const chunk of chunks) {
    const backend = await pickBackend(backends, running)
    if (failure) break
    const task: Promise<void> = backend
      .parse(seq++, chunk.bytes)
      .then(
        ({ summary, buffer }) => {
          summaries.push(summary)
          buffers.give(buffer)
          onParsed(chunk.readFraction)
        },
        (error: unknown) => void (failure ??= error),
      )
      .finally(() => running.delete(task))
    running.add(task)
  }
  await Promise.all(running)
  if (failure) throw failure
  return summaries.sort((a, b) => a.seq - b.seq)
}

/** A started worker with room; this thread while none has started; else wait for room. */
async function pickBackend(
  backends: { inline: ParseBackend; workers: ParseBackend[] },
  running: Set<Promise<void>>,
) {
  for (;;) {
    const started = backends.workers.filter((w) => w.ready)
    if (started.length === 0) return backends.inline
    const free = started.filter((w) => w.inFlight < MAX_IN_FLIGHT)
    if (free.length > 0) return free.reduce((a, b) => (b.inFlight < a.inFlight ? b : a))
    await Promise.race(running)
  }
}
