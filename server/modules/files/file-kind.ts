import { open } from 'node:fs/promises'
import { gunzipSync } from 'node:zlib'
import type { FileKind } from '@shared/domain/files'

const SNIFF_BYTES = 64 * 1024

/** The first bytes of a file (decompressed when gzip), for content sniffing. */
async function head(path: string): Promise<{ bytes: Buffer; gzip: boolean }> {
  const handle = await open(path, 'r')
  try {
    const buffer = Buffer.alloc(SNIFF_BYTES)
    const { bytesRead } = await handle.read(buffer, 0, SNIFF_BYTES, 0)
    const bytes = buffer.subarray(0, bytesRead)
    if (bytes[0] === 0x1f && bytes[1] === 0x8b) {
      // A truncated gzip stream still inflates its first blocks; that is all sniffing needs.
      try {
        return { bytes: gunzipSync(bytes, { finishFlush: 2 }).subarray(0, SNIFF_BYTES), gzip: true }
      } catch {
        return { bytes, gzip: true }
      }
    }
    return { bytes, gzip: false }
  } finally {
    await handle.close()
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
  const { bytes, gzip } = await head(path)
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
