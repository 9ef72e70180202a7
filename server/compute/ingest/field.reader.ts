/**
 * Careful reading of one field at a time (quotes, padding, CRLF, whitespace separators), for what
 * the parser's hot path declines. Quotes follow RFC 4180 as record.boundary.ts reads them: a
 * field that starts with `"` runs to the next lone `"`, `""` inside is one quote, and after the
 * closing quote only padding may come before the separator.
 */
import type { Delimiter } from './table-format.types'

const LF = 10
const CR = 13
const QUOTE = 34
const SPACE = 32
const TAB = 9

export class FieldReader {
  /** The delimiter byte; -1 for whitespace-separated tables. */
  readonly delimiter: number
  readonly whitespace: boolean
  /** Tabs pad fields unless they separate them. */
  private readonly tabPads: boolean
  private readonly decoder = new TextDecoder()
  /** Line feeds inside quoted fields read since the caller last reset it. */
  quotedLines = 0
  /** The last field's text, quotes removed. */
  text = ''
  /** Whether the last separator read ended the record. */
  rowEnded = false

  constructor(delimiter: Delimiter) {
    this.whitespace = delimiter === 'whitespace'
    this.delimiter = this.whitespace ? -1 : delimiter.charCodeAt(0)
    this.tabPads = delimiter !== '\t'
  }

  /** Reads the field at `start` into `text`; returns its end, or minus it when quoting is bad. */
  read(u: Uint8Array, start: number): number {
    const p = this.whitespace ? start : this.skipPads(u, start)
    if (u[p] !== QUOTE) {
      const end = this.fieldEnd(u, p)
      this.text = this.decoder.decode(u.subarray(start, end))
      return end
    }
    const end = this.quoted(u, p)
    return end < 0 ? -this.fieldEnd(u, -end) : end
  }

  /** From an opening quote: the end of the field, or minus the index where quoting went wrong. */
  private quoted(u: Uint8Array, open: number): number {
    let text = ''
    let p = open + 1
    for (;;) {
      const close = u.indexOf(QUOTE, p)
      this.quotedLines += countLineFeeds(u, p, close < 0 ? u.length - 1 : close)
      if (close < 0) return -(u.length - 1)
      if (u[close + 1] === QUOTE) {
        text += this.decoder.decode(u.subarray(p, close + 1))
        p = close + 2
        continue
      }
      this.text = text + this.decoder.decode(u.subarray(p, close))
      const after = this.whitespace ? close + 1 : this.skipPads(u, close + 1)
      return this.isFieldEnd(u, after) ? after : -after
    }
  }

  /** At a separator other than the plain delimiter (CRLF, padding): where the next field starts. */
  separator(u: Uint8Array, start: number): number {
    const p = this.skipPads(u, start)
    const c = u[p]!
    this.rowEnded = c === LF || (c === CR && u[p + 1] === LF)
    if (this.rowEnded) return c === LF ? p + 1 : p + 2
    return c === this.delimiter ? p + 1 : p
  }

  /** The end of a line of nothing but padding at `start`, else -1. */
  blankLineEnd(u: Uint8Array, start: number): number {
    let p = this.skipPads(u, start)
    if (u[p] === CR) p++
    return u[p] === LF ? p + 1 : -1
  }

  fieldEnd(u: Uint8Array, start: number): number {
    let p = start
    while (!this.isFieldEnd(u, p)) p++
    return p
  }

  isFieldEnd(u: Uint8Array, p: number): boolean {
    const c = u[p]
    if (c === LF || c === this.delimiter || c === undefined) return true
    if (c === CR) return u[p + 1] === LF
    return this.whitespace && this.isPad(c)
  }

  /** Index after the line feed ending the record that contains `from` (a field boundary). */
  recordEnd(u: Uint8Array, from: number): number {
    let p = from
    let fieldStart = true
    while (p < u.length) {
      const c = u[p]!
      if (c === LF) return p + 1
      if (c === QUOTE && fieldStart) {
        p = Math.abs(this.quoted(u, p))
        fieldStart = false
        continue
      }
      fieldStart = c === this.delimiter || (fieldStart && this.isPad(c))
      p++
    }
    return u.length
  }

  isPad(c: number | undefined): boolean {
    return c === SPACE || (c === TAB && this.tabPads)
  }

  skipPads(u: Uint8Array, start: number): number {
    let p = start
    while (this.isPad(u[p])) p++
    return p
  }
}

function countLineFeeds(u: Uint8Array, from: number, to: number): number {
  let n = 0
  for (let p = u.indexOf(LF, from); p >= 0 && p < to; p = u.indexOf(LF, p + 1)) n++
  return n
}
