/**
 * Where the last complete record of a buffer ends, so chunks can be parsed independently. A line
 * feed inside a quoted field does not end a record. The rules match the parser's: a quote opens a
 * field only at its start (after the delimiter, a line feed or padding there), `""` inside stands
 * for one quote, and any other quote is a plain character.
 */
import type { Delimiter } from './table-format.types'

const LF = 10
const QUOTE = 34
const SPACE = 32
const TAB = 9

export interface RecordBoundary {
  /** Index after the last line feed outside quotes; 0 when there is none. */
  end: number
  /** The buffer ends inside a quoted field. */
  openQuote: boolean
}

/** `bytes` starts at the start of a record. */
export function lastRecordEnd(bytes: Uint8Array, delimiter: Delimiter): RecordBoundary {
  // Buffer's indexOf is a memchr; the typed-array one walks byte by byte.
  const u = Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength)
  if (u.indexOf(QUOTE) < 0) return { end: u.lastIndexOf(LF) + 1, openQuote: false }
  const d = delimiter === 'whitespace' ? -1 : delimiter.charCodeAt(0)
  let safe = -1
  let outsideFrom = 0
  let q = u.indexOf(QUOTE)
  while (q >= 0) {
    if (opensField(u, q, d)) {
      safe = lastLineFeedBetween(u, outsideFrom, q, safe)
      const close = closingQuote(u, q + 1)
      if (close < 0) return { end: safe + 1, openQuote: true }
      outsideFrom = close + 1
      q = u.indexOf(QUOTE, outsideFrom)
    } else q = u.indexOf(QUOTE, q + 1)
  }
  return { end: lastLineFeedBetween(u, outsideFrom, u.length, safe) + 1, openQuote: false }
}

function opensField(u: Uint8Array, q: number, d: number): boolean {
  let k = q - 1
  const pads = (c: number | undefined) => c === SPACE || (c === TAB && d !== TAB)
  while (k >= 0 && pads(u[k])) k--
  if (k < 0) return true
  const c = u[k]!
  return c === LF || c === d || (d < 0 && k < q - 1)
}

/** The quote closing a field opened before `from`, or -1 when the buffer ends first. */
function closingQuote(u: Uint8Array, from: number): number {
  for (let q = u.indexOf(QUOTE, from); q >= 0; q = u.indexOf(QUOTE, q + 2)) {
    if (q + 1 >= u.length) return -1
    if (u[q + 1] !== QUOTE) return q
  }
  return -1
}

function lastLineFeedBetween(u: Uint8Array, from: number, to: number, fallback: number): number {
  const lf = to > 0 ? u.lastIndexOf(LF, to - 1) : -1
  return lf >= from ? lf : fallback
}
