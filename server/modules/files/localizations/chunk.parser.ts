/**
 * Parses a chunk of complete records (it ends with a line feed) into typed columns, counting
 * rejected rows by reason. The hot path reads plain numbers followed by the delimiter or a line
 * feed straight from the bytes; everything else (quotes, padding, CRLF, bad values) goes through
 * the slow path of `slowField`, which decides what the field holds.
 */
import { classifyFieldText, type FieldValue } from './field.classifier'
import * as decimal from './decimal.scanner'
import type { ParsePlan } from './parse-plan'
import { splitRecord } from './record.splitter'
import {
  addRejection,
  truncateExample,
  type RejectExample,
  type RejectionTallies,
} from './rejections'
import { ACCEPTED, reasonCode, reasonOf, SlotColumns, type StoredArray } from './slot.columns'

// Local bindings: under a CommonJS transform each use of an imported name is a getter call.
const { scanDecimal, scannedValue, POW10, MAX_FAST_DIGITS } = decimal
const LF = 10
const CR = 13
const QUOTE = 34
const SPACE = 32
const TAB = 9
const ZERO = 48
const NINE = 57
const MINUS = 45
const SKIP = -1
const TOO_MANY = -2
const FIELD_COUNT = reasonCode('field_count')
const BAD_QUOTES = reasonCode('bad_quotes')
const SLOW_REASONS: Record<Exclude<FieldValue['kind'], 'number'>, number> = {
  empty: reasonCode('empty_required'),
  nan: reasonCode('nan'),
  infinite: reasonCode('infinite'),
  text: reasonCode('not_a_number'),
}

export interface ParsedChunk {
  rows: number
  /** Line feeds in the chunk, so the next chunk knows its first line number. */
  lines: number
  blankLines: number
  columns: StoredArray[]
  /** Example lines are 0-based within the chunk. */
  rejections: RejectionTallies
}

export class ChunkParser {
  private readonly delimiter: number
  /** The byte that may end a plain number on the fast path: the delimiter, or a space. */
  private readonly fastEnd: number
  /** Tabs pad fields unless they separate them. */
  private readonly tabPads: boolean
  private readonly whitespace: boolean
  private readonly decimal: number
  private readonly fieldCount: number
  private readonly slotOfField: Int32Array
  private readonly required: Uint8Array
  private readonly columns: SlotColumns
  private readonly decoder = new TextDecoder()
  private row = 0
  private line = 0
  private blank = 0
  private quotedLines = 0
  private rowEnded = false
  private value = 0
  private slowValue = 0
  private slowReason = ACCEPTED
  private tallies: RejectionTallies = {}

  constructor(private readonly plan: ParsePlan) {
    this.whitespace = plan.delimiter === 'whitespace'
    this.delimiter = this.whitespace ? SKIP : plan.delimiter.charCodeAt(0)
    this.fastEnd = this.whitespace ? SPACE : this.delimiter
    this.tabPads = plan.delimiter !== '\t'
    this.decimal = plan.decimalMark.charCodeAt(0)
    this.fieldCount = plan.fieldCount
    this.slotOfField = new Int32Array(plan.fieldCount).fill(SKIP)
    plan.slots.forEach((slot, s) => (this.slotOfField[slot.field] = s))
    this.required = Uint8Array.from(plan.slots, (s) => (s.required ? 1 : 0))
    this.columns = new SlotColumns(plan)
  }

  parse(u: Uint8Array): ParsedChunk {
    this.row = this.line = this.blank = 0
    this.tallies = {}
    this.columns.reset(Math.ceil(u.length / (this.plan.rowBytesHint * 0.8)) + 16)
    let p = 0
    while (p < u.length) p = this.record(u, p)
    const rows = this.row
    const chunk = { rows, lines: this.line, blankLines: this.blank, rejections: this.tallies }
    return { ...chunk, columns: this.columns.take(rows) }
  }

  /** One record from `start`; returns where the next one starts. */
  private record(u: Uint8Array, start: number): number {
    const first = u[start]!
    if (first === LF || first === CR || first === SPACE || first === TAB) {
      const blankEnd = this.blankLineEnd(u, start)
      if (blankEnd > 0) return blankEnd
    }
    if (this.row === this.columns.capacity) this.columns.grow()
    this.quotedLines = 0
    let p = this.whitespace ? this.skipPads(u, start) : start
    for (let field = 0; ; field++) {
      const fieldStart = p
      const slot = field < this.fieldCount ? this.slotOfField[field]! : TOO_MANY
      let reason = ACCEPTED
      if (slot >= 0) {
        p = this.plainNumber(u, p)
        if (p < 0) p = this.otherNumber(u, fieldStart, slot)
        reason = this.slowReason
        if (reason === ACCEPTED) reason = this.columns.store(slot, this.row, this.value)
      } else if (slot === SKIP) {
        p = this.slowField(u, fieldStart, SKIP)
        reason = this.slowReason
      } else reason = FIELD_COUNT
      if (reason !== ACCEPTED) return this.reject(u, start, fieldStart, field, p, reason)
      const c = u[p]!
      if (c === this.delimiter) {
        p++
        continue
      }
      p = c === LF ? p + 1 : this.afterField(u, p)
      if (c !== LF && !this.rowEnded) continue
      if (field + 1 !== this.fieldCount) return this.tally(u, start, start, field, p, FIELD_COUNT)
      this.row++
      this.line += 1 + this.quotedLines
      return p
    }
  }

  /**
   * The hot path: `[-]digits[.digits]`, at most 15 digits, ended by the delimiter or a line feed.
   * Exact for the reason given in decimal.scanner.ts (one division of exact doubles). Leaves the
   * value in `value` and returns the end, or -1 for anything else.
   */
  private plainNumber(u: Uint8Array, start: number): number {
    let p = start
    let c = u[p]!
    const negative = c === MINUS
    if (negative) c = u[++p]!
    const integerStart = p
    let mantissa = 0
    while (c >= ZERO && c <= NINE) {
      mantissa = mantissa * 10 + (c - ZERO)
      c = u[++p]!
    }
    let fraction = 0
    let point = 0
    if (c === this.decimal) {
      point = 1
      const fractionStart = ++p
      c = u[p]!
      while (c >= ZERO && c <= NINE) {
        mantissa = mantissa * 10 + (c - ZERO)
        c = u[++p]!
      }
      fraction = p - fractionStart
    }
    const digits = p - integerStart - point
    if (digits === 0 || digits > MAX_FAST_DIGITS) return -1
    if (c !== this.fastEnd && c !== LF && (c !== CR || u[p + 1] !== LF)) return -1
    const magnitude = mantissa / POW10[fraction]!
    this.value = negative ? -magnitude : magnitude
    this.slowReason = ACCEPTED
    return p
  }

  /** Exponents, plus signs, padding, long mantissas; then words and quotes in `slowField`. */
  private otherNumber(u: Uint8Array, start: number, slot: number): number {
    const from = this.whitespace ? start : this.skipPads(u, start)
    const end = scanDecimal(u, from, this.decimal)
    const after = end < 0 || this.whitespace ? end : this.skipPads(u, end)
    if (end >= 0 && this.isFieldEnd(u, after)) {
      this.value = scannedValue[0]!
      this.slowReason = ACCEPTED
      return after
    }
    const p = this.slowField(u, start, slot)
    this.value = this.slowValue
    return p
  }

  /** A line of nothing but padding: counts it and returns its end, else -1. */
  private blankLineEnd(u: Uint8Array, start: number): number {
    let p = this.skipPads(u, start)
    if (u[p] === CR) p++
    if (u[p] !== LF) return -1
    this.blank++
    this.line++
    return p + 1
  }

  /** At a separator that is not the plain delimiter: CRLF, or padding (whitespace tables). */
  private afterField(u: Uint8Array, start: number): number {
    const p = this.skipPads(u, start)
    const c = u[p]!
    this.rowEnded = c === LF || (c === CR && u[p + 1] === LF)
    if (this.rowEnded) return c === LF ? p + 1 : p + 2
    return c === this.delimiter ? p + 1 : p
  }

  /**
   * Reads one field the careful way (quotes, padding, words); leaves its verdict in slowValue and
   * slowReason and returns the index of the byte that ends it.
   */
  private slowField(u: Uint8Array, start: number, slot: number): number {
    let p = this.whitespace ? start : this.skipPads(u, start)
    let text: string
    if (u[p] === QUOTE) {
      const quoted = this.quotedField(u, p)
      if (quoted < 0) return this.fail(BAD_QUOTES, this.fieldEnd(u, -quoted))
      p = quoted
      text = this.quotedText
    } else {
      p = this.fieldEnd(u, p)
      text = this.decoder.decode(u.subarray(start, p))
    }
    if (slot === SKIP) return this.fail(ACCEPTED, p)
    const verdict = classifyFieldText(text, this.plan.decimalMark)
    if (verdict.kind === 'number') {
      this.slowValue = verdict.value
      return this.fail(ACCEPTED, p)
    }
    const optional =
      this.required[slot] === 0 && (verdict.kind === 'empty' || verdict.kind === 'nan')
    this.slowValue = NaN
    return this.fail(optional ? ACCEPTED : SLOW_REASONS[verdict.kind], p)
  }

  private quotedText = ''

  /** A quoted field from its opening quote: end index, or minus the index where it went wrong. */
  private quotedField(u: Uint8Array, open: number): number {
    let text = ''
    let p = open + 1
    for (;;) {
      const close = u.indexOf(QUOTE, p)
      if (close < 0) {
        this.quotedLines += countByte(u, LF, p, u.length - 1)
        return -(u.length - 1)
      }
      this.quotedLines += countByte(u, LF, p, close)
      if (u[close + 1] === QUOTE) {
        text += this.decoder.decode(u.subarray(p, close + 1))
        p = close + 2
        continue
      }
      this.quotedText = text + this.decoder.decode(u.subarray(p, close))
      const after = this.whitespace ? close + 1 : this.skipPads(u, close + 1)
      return this.isFieldEnd(u, after) ? after : -after
    }
  }

  private fieldEnd(u: Uint8Array, start: number): number {
    let p = start
    while (!this.isFieldEnd(u, p)) p++
    return p
  }

  private isFieldEnd(u: Uint8Array, p: number): boolean {
    const c = u[p]
    if (c === LF || c === this.delimiter || c === undefined) return true
    if (c === CR) return u[p + 1] === LF
    return this.whitespace && this.isPad(c)
  }

  private fail(reason: number, end: number): number {
    this.slowReason = reason
    return end
  }

  /** Rejects the record containing `at`: counts it and returns where the next one starts. */
  private reject(
    u: Uint8Array,
    start: number,
    fieldStart: number,
    field: number,
    at: number,
    reason: number,
  ) {
    return this.tally(u, start, fieldStart, field, this.recordEnd(u, at), reason, at)
  }

  /** Counts a rejected record that ends at `end` (after its line feed), with an example. */
  private tally(
    u: Uint8Array,
    start: number,
    fieldStart: number,
    field: number,
    end: number,
    reason: number,
    fieldEnd = end,
  ) {
    const lineEnd = u[end - 2] === CR ? end - 2 : end - 1
    const decode = (from: number, to: number) =>
      this.decoder.decode(u.subarray(from, Math.max(from, to)))
    const line = decode(start, lineEnd)
    const example: RejectExample = { line: this.line, text: truncateExample(line.trim()) }
    if (reason === FIELD_COUNT) {
      const found = splitRecord(line, this.plan.delimiter).length
      example.text = truncateExample(`${this.fieldCount} expected, ${found} found: ${line}`)
    } else if (reason !== BAD_QUOTES) {
      example.text = truncateExample(decode(fieldStart, Math.min(fieldEnd, lineEnd)).trim())
      example.column = this.columnName(field)
    }
    addRejection(this.tallies, reasonOf(reason), example)
    this.line += 1 + this.quotedLines
    return end
  }

  private columnName(field: number): string {
    const slot = this.plan.slots[this.slotOfField[field] ?? SKIP]
    return slot?.sourceName ?? `column ${field + 1}`
  }

  /** Index after the line feed that ends the record containing `from` (quotes respected). */
  private recordEnd(u: Uint8Array, from: number): number {
    let p = from
    let fieldStart = true
    while (p < u.length) {
      const c = u[p]!
      if (c === LF) return p + 1
      if (c === QUOTE && fieldStart) {
        const quoted = this.quotedField(u, p)
        p = quoted < 0 ? -quoted : quoted
        fieldStart = false
        continue
      }
      fieldStart = c === this.delimiter || (fieldStart && this.isPad(c))
      p++
    }
    return u.length
  }

  private isPad(c: number | undefined): boolean {
    return c === SPACE || (c === TAB && this.tabPads)
  }

  private skipPads(u: Uint8Array, start: number): number {
    let p = start
    while (this.isPad(u[p])) p++
    return p
  }
}

function countByte(u: Uint8Array, byte: number, from: number, to: number): number {
  let n = 0
  for (let p = u.indexOf(byte, from); p >= 0 && p < to; p = u.indexOf(byte, p + 1)) n++
  return n
}
