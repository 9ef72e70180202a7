import { open } from 'node:fs/promises'
import { gunzipSync } from 'node:zlib'
import type { FileKind } from '@shared/domain/files'

/** The first bytes content sniffing looks at. */
export const SNIFF_BYTES = 64 * 1024

/** The first bytes of a file, as many as content sniffing looks at. */
async function firstBytes(path: string): Promise<Buffer> {
  const handle = await open(path, 'r')
  try {
    const buffer = Buffer.alloc(SNIFF_BYTES)
    const { bytesRead } = await handle.read(buffer, 0, SNIFF_BYTES, 0)
    return buffer.subarray(0, bytesRead)
  } finally {
    await handle.close()
  }
}

/** A file's first bytes, decompressed when they start a gzip stream. */
function inflated(bytes: Buffer): { bytes: Buffer; gzip: boolean } {
  if (bytes[0] !== 0x1f || bytes[1] !== 0x8b) return { bytes, gzip: false }
  // A truncated gzip stream still inflates its first blocks; that is all sniffing needs.
  try {
    return { bytes: gunzipSync(bytes, { finishFlush: 2 }).subarray(0, SNIFF_BYTES), gzip: true }
  } catch {
    return { bytes, gzip: true }
  }
}

const isTiff = (b: Buffer) =>
  b.length >= 4 &&
  ((b[0] === 0x49 && b[1] === 0x49 && (b[2] === 0x2a || b[2] === 0x2b) && b[3] === 0) ||
    (b[0] === 0x4d && b[1] === 0x4d && b[2] === 0 && (b[3] === 0x2a || b[3] === 0x2b)))

/** Printable text with line breaks and delimited numbers: what a localization table looks like. */
function looksLikeTable(text: string): boolean {
  const lines = text
    .split(/\r?\n/)
    .filter((l) => l.trim())
    .slice(0, 20)
  if (lines.length < 2) return false
  const numeric = lines
    .slice(1)
    .filter((l) => /^[\s"']*[-+]?[\d.]/.test(l) && /[,\t; |]/.test(l)).length
  return numeric >= Math.min(lines.length - 1, 3)
}

/**
 * What a file is, from its content rather than its name: TIFF/BigTIFF raw stacks, delimited text
 * tables (plain or gzip), XML metadata. The extension is only a tie-breaker for text.
 */
export async function detectFileKind(
  path: string,
  name = '',
): Promise<{ kind: FileKind; mediaType: string }> {
  return fileKindOfHead(await firstBytes(path), name)
}

/**
 * detectFileKind from the file's first bytes already at hand (at least the first SNIFF_BYTES, or
 * the whole file when shorter): an object in the bucket is sniffed from one ranged read.
 */
export function fileKindOfHead(head: Buffer, name = ''): { kind: FileKind; mediaType: string } {
  const { bytes, gzip } = inflated(head.subarray(0, SNIFF_BYTES))
  if (!gzip && isTiff(bytes)) return { kind: 'raw_stack', mediaType: 'image/tiff' }
  if (bytes.includes(0))
    return { kind: 'other', mediaType: gzip ? 'application/gzip' : 'application/octet-stream' }
  const text = bytes.toString('utf8').replace(/^\uFEFF/, '')
  if (/^\s*<(\?xml|OME[\s>])/.test(text)) return { kind: 'metadata', mediaType: 'application/xml' }
  const tableName =
    /\.(csv|tsv|txt|dat)(\.gz)?$/i.test(name) && /[,\t;|]/.test(text.split(/\r?\n/)[0] ?? '')
  if (looksLikeTable(text) || tableName)
    return {
      kind: 'localization_table',
      mediaType: gzip
        ? 'application/gzip'
        : text.includes('\t')
          ? 'text/tab-separated-values'
          : 'text/csv',
    }
  return { kind: 'other', mediaType: gzip ? 'application/gzip' : 'text/plain' }
}
