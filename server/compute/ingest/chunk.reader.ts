/**
 * Streams a table's data records in chunks of whole records, each ending with a line feed and
 * owning its ArrayBuffer (so it can be transferred to a worker). Gzip is decompressed on the fly;
 * nothing holds more than a chunk and one partial record.
 */
import { createReadStream } from 'node:fs'
import { open, stat, type FileHandle } from 'node:fs/promises'
import { createGunzip } from 'node:zlib'
import type { BufferPool } from './buffer.pool'
import { lastRecordEnd } from './record.boundary'
import { damagedGzip } from './sniff.service'
import { MAX_RECORD_BYTES, TableFormatError, type TableFormat } from './table-format.types'

const LF = 10

export interface TableChunk {
  bytes: Uint8Array<ArrayBuffer>
  /** Share of the source file (compressed bytes for gzip) read so far, 0…1. */
  readFraction: number
}

interface ByteSource {
  /** Fills `into` from `from`; returns the bytes written, 0 at the end. */
  fill(into: Uint8Array, from: number): Promise<number>
  readFraction(): number
  close(): Promise<void>
}

export async function* readRecordChunks(
  path: string,
  format: TableFormat,
  chunkBytes: number,
  buffers: BufferPool,
  /** Gzip: the most text one compressed byte may expand to (a decompression bomb stops here). */
  maxExpansion = Infinity,
  /** The first chunk's size, when it should be smaller than the rest. */
  firstChunkBytes = chunkBytes,
): AsyncGenerator<TableChunk> {
  const source =
    format.compression === 'gzip'
      ? await gzipSource(path, format.dataOffset, maxExpansion)
      : await plainSource(path, format.dataOffset)
  try {
    let carry = new Uint8Array(0)
    let offset = format.dataOffset
    let want = firstChunkBytes
    for (;;) {
      const size = carry.length + Math.max(want, carry.length)
      const buffer = new Uint8Array(buffers.take(size), 0, size)
      buffer.set(carry)
      const filled = await fillFrom(source, buffer, carry.length)
      if (filled < buffer.length) {
        if (filled > 0) yield { bytes: withFinalLineFeed(buffer, filled), readFraction: 1 }
        return
      }
      const boundary = lastRecordEnd(buffer, format.delimiter)
      if (boundary.end === 0) {
        if (filled > MAX_RECORD_BYTES) throw oversizedRecord(boundary.openQuote, offset)
        carry = buffer
        continue
      }
      carry = buffer.slice(boundary.end)
      offset += boundary.end
      want = chunkBytes
      yield {
        bytes: buffer.subarray(0, boundary.end),
        readFraction: source.readFraction(),
      } satisfies TableChunk
    }
  } finally {
    await source.close()
  }
}

async function fillFrom(source: ByteSource, buffer: Uint8Array, from: number): Promise<number> {
  let filled = from
  while (filled < buffer.length) {
    const n = await source.fill(buffer, filled)
    if (n === 0) break
    filled += n
  }
  return filled
}

function withFinalLineFeed(
  buffer: Uint8Array<ArrayBuffer>,
  filled: number,
): Uint8Array<ArrayBuffer> {
  if (buffer[filled - 1] === LF) return buffer.subarray(0, filled)
  const bytes = new Uint8Array(filled + 1)
  bytes.set(buffer.subarray(0, filled))
  bytes[filled] = LF
  return bytes
}

function oversizedRecord(openQuote: boolean, offset: number) {
  const where = `near byte ${offset.toLocaleString('en')} of the table text`
  return openQuote
    ? new TableFormatError(
        'unterminated_quote',
        `A quoted field opened ${where} is not closed within 1 MiB`,
      )
    : new TableFormatError('line_too_long', `A line longer than 1 MiB starts ${where}`)
}

function expanded(size: number, maxExpansion: number) {
  return new TableFormatError(
    'expansion',
    `The compressed table expands to more than ${maxExpansion} times its ${size.toLocaleString('en')} bytes; ` +
      'it was stopped as a likely decompression bomb. Upload the table uncompressed, or ask a site admin to raise INGEST_MAX_EXPANSION.',
  )
}

async function plainSource(path: string, offset: number): Promise<ByteSource> {
  const file: FileHandle = await open(path, 'r')
  const size = (await file.stat()).size
  let position = offset
  return {
    async fill(into, from) {
      const { bytesRead } = await file.read(into, from, into.length - from, position)
      position += bytesRead
      return bytesRead
    },
    readFraction: () => (size ? Math.min(1, position / size) : 1),
    close: () => file.close(),
  }
}

async function gzipSource(path: string, skip: number, maxExpansion: number): Promise<ByteSource> {
  const size = (await stat(path)).size
  const maxText = Math.max(1 << 20, size * maxExpansion)
  let text = 0
  const raw = createReadStream(path, { highWaterMark: 1 << 20 })
  const gunzip = createGunzip({ chunkSize: 1 << 20 })
  raw.on('error', (error) => gunzip.destroy(error))
  const pieces = raw.pipe(gunzip)[Symbol.asyncIterator]()
  let piece: Uint8Array = new Uint8Array(0)
  let toSkip = skip
  return {
    async fill(into, from) {
      while (piece.length === 0 || toSkip > 0) {
        const next = await pieces
          .next()
          .catch((error: unknown) => Promise.reject(damagedGzip(error)))
        if (next.done) return 0
        piece = next.value as Buffer
        text += piece.length
        if (text > maxText) throw expanded(size, maxExpansion)
        const skipped = Math.min(toSkip, piece.length)
        piece = piece.subarray(skipped)
        toSkip -= skipped
      }
      const n = Math.min(piece.length, into.length - from)
      into.set(piece.subarray(0, n), from)
      piece = piece.subarray(n)
      return n
    },
    readFraction: () => (size ? Math.min(1, raw.bytesRead / size) : 1),
    close: async () => {
      raw.destroy()
      gunzip.destroy()
    },
  }
}
