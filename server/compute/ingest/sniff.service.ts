/** `sniffTable`: how a deposited table is written, read from its first MiB. */
import { createReadStream } from 'node:fs'
import { open } from 'node:fs/promises'
import { createGunzip } from 'node:zlib'
import { assertText } from './head.lines'
import { analyzeHead, type FormatOverrides } from './table.sniffer'
import { MAX_RECORD_BYTES, TableFormatError, type TableSniff } from './table-format.types'

const SNIFF_BYTES = MAX_RECORD_BYTES + 64 * 1024

/**
 * Delimiter, header, byte-order mark, gzip (by its magic bytes 1f 8b, whatever the name), the
 * first rows and the column count. Throws `TableFormatError` when the file is no text table;
 * softer findings (rows with another field count) come back in `problems`.
 */
export async function sniffTable(path: string, overrides?: FormatOverrides): Promise<TableSniff> {
  const head = await readHead(path)
  if (head.bytes.length === 0) {
    const what =
      head.compression === 'gzip'
        ? 'The compressed file holds no data'
        : 'The file is empty (0 bytes)'
    throw new TableFormatError('empty', what)
  }
  assertText(head.bytes)
  return analyzeHead(head.bytes, head.complete, head.compression, overrides)
}

export async function isGzip(path: string): Promise<boolean> {
  const file = await open(path, 'r')
  try {
    const magic = new Uint8Array(2)
    const { bytesRead } = await file.read(magic, 0, 2, 0)
    return bytesRead === 2 && magic[0] === 0x1f && magic[1] === 0x8b
  } finally {
    await file.close()
  }
}

async function readHead(path: string) {
  if (await isGzip(path)) return { ...(await gunzipHead(path)), compression: 'gzip' as const }
  const file = await open(path, 'r')
  try {
    const buffer = new Uint8Array(SNIFF_BYTES + 1)
    const { bytesRead } = await file.read(buffer, 0, buffer.length, 0)
    const bytes = buffer.subarray(0, Math.min(bytesRead, SNIFF_BYTES))
    return { bytes, complete: bytesRead <= SNIFF_BYTES, compression: 'none' as const }
  } finally {
    await file.close()
  }
}

async function gunzipHead(path: string) {
  const pieces: Buffer[] = []
  let total = 0
  const source = createReadStream(path)
  const gunzip = createGunzip()
  source.on('error', (error) => gunzip.destroy(error))
  source.pipe(gunzip)
  try {
    for await (const piece of gunzip as AsyncIterable<Buffer>) {
      pieces.push(piece)
      total += piece.length
      if (total > SNIFF_BYTES) break
    }
  } catch (error) {
    if (total === 0) throw damagedGzip(error)
  } finally {
    source.destroy()
    gunzip.destroy()
  }
  const bytes = new Uint8Array(Buffer.concat(pieces)).subarray(0, Math.min(total, SNIFF_BYTES))
  return { bytes, complete: total <= SNIFF_BYTES }
}

export function damagedGzip(error: unknown) {
  const reason = error instanceof Error ? error.message : String(error)
  return new TableFormatError('binary', `The gzip data is damaged or cut short (${reason})`)
}
