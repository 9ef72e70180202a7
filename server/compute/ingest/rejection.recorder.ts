/**
 * Counts a chunk's rejected records by reason, with an example each: the offending field (or the
 * whole line for field-count and quoting problems), its column and its line within the chunk.
 */
import type { ParsePlan } from './parse-plan'
import { splitRecord } from './record.splitter'
import {
  addRejection,
  truncateExample,
  type RejectExample,
  type RejectionTallies,
} from './rejections'
import { reasonCode, reasonOf } from './slot.columns'

const CR = 13
const FIELD_COUNT = reasonCode('field_count')
const BAD_QUOTES = reasonCode('bad_quotes')

export interface RejectedRecord {
  /** Where the record starts and where it ends (after its line feed). */
  start: number
  end: number
  /** 0-based line of the record within the chunk. */
  line: number
  reason: number
  /** The field that failed: its index and byte range. */
  field: number
  fieldStart: number
  fieldEnd: number
}

export class RejectionRecorder {
  tallies: RejectionTallies = {}
  private readonly decoder = new TextDecoder()

  constructor(private readonly plan: ParsePlan) {}

  record(u: Uint8Array, rejected: RejectedRecord) {
    const lineEnd = u[rejected.end - 2] === CR ? rejected.end - 2 : rejected.end - 1
    const line = this.decode(u, rejected.start, lineEnd)
    const found = splitRecord(line, this.plan.delimiter).length
    // A line with the wrong number of fields fails on that first, whatever field broke first.
    const reason = found === this.plan.fieldCount ? rejected.reason : FIELD_COUNT
    const example: RejectExample = { line: rejected.line, text: truncateExample(line.trim()) }
    if (reason === FIELD_COUNT) {
      example.text = truncateExample(`${this.plan.fieldCount} expected, ${found} found: ${line}`)
    } else if (reason !== BAD_QUOTES) {
      const text = this.decode(u, rejected.fieldStart, Math.min(rejected.fieldEnd, lineEnd))
      example.text = truncateExample(text.trim())
      example.column = this.columnName(rejected.field)
    }
    addRejection(this.tallies, reasonOf(reason), example)
  }

  private decode(u: Uint8Array, from: number, to: number) {
    return this.decoder.decode(u.subarray(from, Math.max(from, to)))
  }

  private columnName(field: number): string {
    const slot = this.plan.slots.find((s) => s.field === field)
    return slot?.sourceName ?? `column ${field + 1}`
  }
}
