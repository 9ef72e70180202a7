/**
 * Parses a chunk of complete records (it ends with a line feed) into typed columns, counting
 * rejected rows by reason. Delimited tables go through the WebAssembly fast path first
 * (plain-rows.ts), which stores every row made of plain numbers and hands back each row it
 * declines; those, and whitespace-separated tables, are read here. The hot path here reads plain
 * numbers followed by the delimiter or a line feed straight from the bytes; exponents and long
 * mantissas go to the full decimal scanner, and quotes, padding and words to the field reader
 * and the classifier.
 */
import * as decimal from './decimal.scanner'
import { classifyFieldText, type FieldValue } from './field.classifier'
import { FieldReader } from './field.reader'
import type { ParsePlan } from './parse-plan'
import { PlainRows } from './plain-rows'
import { RejectionRecorder } from './rejection.recorder'
import type { RejectionTallies } from './rejections'
import { ACCEPTED, reasonCode, SlotColumns } from './slot.columns'
import type { StoredArray } from './stored-array'

// Local bindings: under a CommonJS transform each use of an imported name is a getter call.
const { scanDecimal, scannedValue, POW10 } = decimal
/** Decimal digits that always fit an int32 (10^9 < 2^31). */
const INT32_DIGITS = 9
const LF = 10
const CR = 13
const SPACE = 32
const TAB = 9
const ZERO = 48
const NINE = 57
const MINUS = 45
const SKIP = -1
const TOO_MANY = -2
const FIELD_COUNT = reasonCode('field_count')
const BAD_QUOTES = reasonCode('bad_quotes')
const INFINITE = reasonCode('infinite')
const SLOW_REASONS: Record<Exclude<FieldValue['kind'], 'number'>, number> = {
  empty: reasonCode('empty_required'),
  nan: reasonCode('nan'),
  infinite: INFINITE,
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
  private readonly fields: FieldReader
  private readonly delimiter: number
  /** The byte that may end a plain number on the fast path: the delimiter, or a space. */
  private readonly fastEnd: number
  private readonly decimal: number
  private readonly fieldCount: number
  private readonly slotOfField: Int32Array
  private readonly required: Uint8Array
  private readonly columns: SlotColumns
  /** The WebAssembly fast path and its memory, where the columns live; null without it. */
  readonly shared: PlainRows | null
  private rejections: RejectionRecorder
  private row = 0
  private line = 0
  private blank = 0
  /** The last field's value and verdict (ACCEPTED or a reason code). */
  private value = 0
  private verdict = ACCEPTED

  constructor(
    private readonly plan: ParsePlan,
    { fastPath = true }: { fastPath?: boolean } = {},
  ) {
    this.fields = new FieldReader(plan.delimiter)
    this.delimiter = this.fields.delimiter
    this.fastEnd = this.fields.whitespace ? SPACE : this.delimiter
    this.decimal = plan.decimalMark.charCodeAt(0)
    this.fieldCount = plan.fieldCount
    this.slotOfField = new Int32Array(plan.fieldCount).fill(SKIP)
    plan.slots.forEach((slot, s) => (this.slotOfField[slot.field] = s))
    this.required = Uint8Array.from(plan.slots, (s) => (s.required ? 1 : 0))
    this.shared = fastPath ? PlainRows.for(plan) : null
    this.columns = new SlotColumns(plan, this.shared)
    this.rejections = new RejectionRecorder(plan)
  }

  parse(u: Uint8Array): ParsedChunk {
    this.row = this.line = this.blank = 0
    this.rejections = new RejectionRecorder(this.plan)
    const capacity = Math.ceil(u.length / (this.plan.rowBytesHint * 0.8)) + 16
    if (this.shared) {
      this.shared.load(u)
      this.columns.reset(capacity)
      this.mixed(this.shared, u.length)
    } else {
      this.columns.reset(capacity)
      let p = 0
      while (p < u.length) p = this.record(u, p)
    }
    const rows = this.row
    const tallies = this.rejections.tallies
    return {
      rows,
      lines: this.line,
      blankLines: this.blank,
      rejections: tallies,
      columns: this.columns.take(rows),
    }
  }

  /** Runs of plain rows in WebAssembly; each row it declines, and more room, here. */
  private mixed(plain: PlainRows, length: number) {
    let p = 0
    while (p < length) {
      p = plain.parse(p, this.row, this.columns.capacity)
      this.row += plain.rows
      this.line += plain.rows
      if (p >= length) break
      if (this.row === this.columns.capacity) this.columns.grow()
      else p = this.record(plain.input, p)
    }
  }

  /** One record from `start`; returns where the next one starts. */
  private record(u: Uint8Array, start: number): number {
    const first = u[start]!
    if (first === LF || first === CR || first === SPACE || first === TAB) {
      const blankEnd = this.fields.blankLineEnd(u, start)
      if (blankEnd > 0) {
        this.blank++
        this.line++
        return blankEnd
      }
    }
    if (this.row === this.columns.capacity) this.columns.grow()
    this.fields.quotedLines = 0
    let p = this.fields.whitespace ? this.fields.skipPads(u, start) : start
    for (let field = 0; ; field++) {
      const fieldStart = p
      const slot = field < this.fieldCount ? this.slotOfField[field]! : TOO_MANY
      if (slot >= 0) {
        p = this.plainNumber(u, p)
        if (p < 0) p = this.otherNumber(u, fieldStart, slot)
        if (this.verdict === ACCEPTED) this.verdict = this.columns.store(slot, this.row, this.value)
      } else if (slot === SKIP) p = this.skippedField(u, fieldStart)
      else this.verdict = FIELD_COUNT
      if (this.verdict !== ACCEPTED) return this.reject(u, start, field, fieldStart, p)
      const c = u[p]!
      if (c === this.delimiter) {
        p++
        continue
      }
      p = c === LF ? p + 1 : this.fields.separator(u, p)
      if (c !== LF && !this.fields.rowEnded) continue
      if (field + 1 !== this.fieldCount) return this.reject(u, start, field, start, p, p)
      this.row++
      this.line += 1 + this.fields.quotedLines
      return p
    }
  }

  /**
   * The hot path: `[-]digits[.digits]`, at most 9 digits, ended by the delimiter or a line feed.
   * The digits fit an int32 (cheaper than double arithmetic) and the value is one division of
   * exact doubles, so exact for the reason given in decimal.scanner.ts. Leaves the value in
   * `value` and returns the end, or -1 for anything else (longer numbers go to the scanner).
   */
  private plainNumber(u: Uint8Array, start: number): number {
    let p = start
    let c = u[p]!
    const negative = c === MINUS
    if (negative) c = u[++p]!
    const integerStart = p
    let mantissa = 0
    while (c >= ZERO && c <= NINE) {
      mantissa = (mantissa * 10 + c - ZERO) | 0
      c = u[++p]!
    }
    let fraction = 0
    let point = 0
    if (c === this.decimal) {
      point = 1
      const fractionStart = ++p
      c = u[p]!
      while (c >= ZERO && c <= NINE) {
        mantissa = (mantissa * 10 + c - ZERO) | 0
        c = u[++p]!
      }
      fraction = p - fractionStart
    }
    const digits = p - integerStart - point
    if (digits === 0 || digits > INT32_DIGITS) return -1
    if (c !== this.fastEnd && c !== LF && (c !== CR || u[p + 1] !== LF)) return -1
    const magnitude = mantissa / POW10[fraction]!
    this.value = negative ? -magnitude : magnitude
    this.verdict = ACCEPTED
    return p
  }

  /** Exponents, plus signs, padding, long mantissas; then words and quotes, the slow way. */
  private otherNumber(u: Uint8Array, start: number, slot: number): number {
    const from = this.fields.whitespace ? start : this.fields.skipPads(u, start)
    const end = scanDecimal(u, from, this.decimal)
    const after = end < 0 || this.fields.whitespace ? end : this.fields.skipPads(u, end)
    if (end < 0 || !this.fields.isFieldEnd(u, after)) return this.slowField(u, start, slot)
    this.value = scannedValue[0]!
    this.verdict = Number.isFinite(this.value) ? ACCEPTED : INFINITE
    return after
  }

  /** A field read by the field reader and judged by the classifier. */
  private slowField(u: Uint8Array, start: number, slot: number): number {
    const end = this.fields.read(u, start)
    this.value = NaN
    if (end < 0) return this.judge(BAD_QUOTES, -end)
    const verdict = classifyFieldText(this.fields.text, this.plan.decimalMark)
    if (verdict.kind === 'number') {
      this.value = verdict.value
      return this.judge(ACCEPTED, end)
    }
    const missing = verdict.kind === 'empty' || verdict.kind === 'nan'
    return this.judge(
      missing && this.required[slot] === 0 ? ACCEPTED : SLOW_REASONS[verdict.kind],
      end,
    )
  }

  /** A field no slot reads: only its end matters (and its quoting). */
  private skippedField(u: Uint8Array, start: number): number {
    const end = this.fields.read(u, start)
    return end < 0 ? this.judge(BAD_QUOTES, -end) : this.judge(ACCEPTED, end)
  }

  private judge(verdict: number, end: number): number {
    this.verdict = verdict
    return end
  }

  /**
   * Counts the record from `start` as rejected and returns where the next one starts. `fieldEnd`
   * is where the failing field stopped; `ended` the record's end when it is already known.
   */
  private reject(
    u: Uint8Array,
    start: number,
    field: number,
    fieldStart: number,
    fieldEnd: number,
    ended = -1,
  ) {
    const reason = this.verdict === ACCEPTED ? FIELD_COUNT : this.verdict
    this.verdict = ACCEPTED
    const end = ended >= 0 ? ended : this.fields.recordEnd(u, fieldEnd)
    this.rejections.record(u, { start, end, line: this.line, reason, field, fieldStart, fieldEnd })
    this.line += 1 + this.fields.quotedLines
    return end
  }
}
