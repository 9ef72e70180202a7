/**
 * Sends chunks to the parse backends as they are read, at most a couple waiting per backend, so
 * reading, decompressing and parsing overlap while memory stays bounded.
 */
import type { TableChunk } from './chunk.reader'
import type { ChunkSummary } from './chunk.store'
import type { ParseBackend } from './ingest.backends'

const MAX_IN_FLIGHT = 2

export async function parseChunks(
  chunks: AsyncIterable<TableChunk>,
  backends: ParseBackend[],
  onParsed: (readFraction: number) => void,
): Promise<ChunkSummary[]> {
  const summaries: ChunkSummary[] = []
  const running = new Set<Promise<void>>()
  let failure: unknown = null
  let seq = 0
  for await (const chunk of chunks) {
    while (running.size > 0 && Math.min(...backends.map((b) => b.inFlight)) >= MAX_IN_FLIGHT) {
      await Promise.race(running)
    }
    if (failure) break
    const backend = backends.reduce((a, b) => (b.inFlight < a.inFlight ? b : a))
    const task: Promise<void> = backend
      .parse(seq++, chunk.bytes)
      .then(
        (summary) => {
          summaries.push(summary)
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
