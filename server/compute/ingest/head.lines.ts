/**
 * The first lines of a table, as byte ranges, for sniffing. A line feed inside double quotes does
 * not end a line (quote parity: good enough before the delimiter is known).
 */
import { MAX_RECORD_BYTES, TableFormatError } from './table-format.types'

const LF = 10
const CR = 13
const QUOTE = 34

export interface HeadLine {
  start: number
  /** Index of the line feed, or of the end of the bytes for a last line without one. */
  end: number
  text: string
}

const decoder = new TextDecoder()

/**
 * Up to `limit` complete lines from `start`. `complete` says the bytes are the whole file, so the
 * last line counts even without a line feed.
 */
export function headLines(bytes: Uint8Array, start: number, complete: boolean, limit: number) {
  const lines: HeadLine[] = []
  let p = start
  while (lines.length < limit && p < bytes.length) {
    const lf = lineFeedOutsideQuotes(bytes, p)
    if (lf < 0 && !complete) break
    const end = lf < 0 ? bytes.length : lf
    const textEnd = end > p && bytes[end - 1] === CR ? end - 1 : end
    lines.push({ start: p, end, text: decoder.decode(bytes.subarray(p, textEnd)) })
    p = end + 1
  }
  if (lines.length === 0 && !complete && bytes.length - start >= MAX_RECORD_BYTES) {
    throw new TableFormatError(
      'line_too_long',
      `No line break in the first ${MAX_RECORD_BYTES >> 20} MiB: a table needs one line per ` +
        'localization (this looks like a single enormous line)',
    )
  }
  return lines
}

/** The line feed ending the line at `start`; a stray quote is ignored after 64 KiB. */
function lineFeedOutsideQuotes(bytes: Uint8Array, start: number): number {
  let lf = bytes.indexOf(LF, start)
  let quotes = lf < 0 ? 0 : countQuotes(bytes, start, lf)
  while (lf >= 0 && quotes % 2 === 1 && lf - start < 64 * 1024) {
    const next = bytes.indexOf(LF, lf + 1)
    if (next < 0) return bytes.indexOf(LF, start)
    quotes += countQuotes(bytes, lf, next)
    lf = next
  }
  return lf
}

function countQuotes(bytes: Uint8Array, from: number, to: number): number {
  const line = bytes.subarray(from, to)
  let n = 0
  for (let q = line.indexOf(QUOTE); q >= 0; q = line.indexOf(QUOTE, q + 1)) n++
  return n
}

const MAGIC: [string, number[]][] = [
  ['a TIFF image', [0x49, 0x49, 0x2a, 0x00]],
  ['a TIFF image', [0x4d, 0x4d, 0x00, 0x2a]],
  ['a PNG image', [0x89, 0x50, 0x4e, 0x47]],
  ['a ZIP archive', [0x50, 0x4b, 0x03, 0x04]],
  ['an HDF5 file', [0x89, 0x48, 0x44, 0x46]],
  ['an Apache Arrow file', [0x41, 0x52, 0x52, 0x4f, 0x57, 0x31]],
]

/** Throws when the bytes are not UTF-8 text: a known binary format, UTF-16, or control bytes. */
export function assertText(bytes: Uint8Array) {
  const known = MAGIC.find(([, magic]) => magic.every((b, i) => bytes[i] === b))
  if (known) throw new TableFormatError('binary', `This is ${known[0]}, not a text table`)
  if ((bytes[0] === 0xff && bytes[1] === 0xfe) || (bytes[0] === 0xfe && bytes[1] === 0xff)) {
    throw new TableFormatError('encoding', 'The table is UTF-16 text; save it as UTF-8')
  }
  const probe = bytes.subarray(0, 64 * 1024)
  let control = 0
  for (const b of probe) if (b < 9 || (b > 13 && b < 32)) control++
  if (probe.includes(0) || control > probe.length / 100) {
    throw new TableFormatError('binary', 'The file holds binary data, not a text table')
  }
  const cr = probe.indexOf(CR)
  if (cr >= 0 && !probe.includes(LF) && cr < probe.length - 1) {
    throw new TableFormatError(
      'encoding',
      'Lines end with a lone CR; save with LF or CRLF line ends',
    )
  }
}
