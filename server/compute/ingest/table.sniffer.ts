/**
 * Reads the layout of a table from its first bytes: byte-order mark, comment lines, delimiter,
 * decimal mark, header, column count, and rows that do not fit. Pure: the file is read elsewhere.
 */
import { headLines, type HeadLine } from './head.lines'
import { splitRecord } from './record.splitter'
import {
  DELIMITERS,
  TableFormatError,
  type Delimiter,
  type TableFormat,
  type TableSniff,
} from './table-format.types'

export type FormatOverrides = Partial<Pick<TableFormat, 'delimiter' | 'hasHeader' | 'decimalMark'>>

const SAMPLE_LINES = 200
const DETECTION_LINES = 50
const SAMPLE_ROWS = 20
const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$|^[+-]?(nan|inf|infinity)$/i
const COMMA_NUMBER = /^[+-]?\d+,\d+([eE][+-]?\d+)?$/

export function analyzeHead(
  bytes: Uint8Array,
  complete: boolean,
  compression: TableFormat['compression'],
  overrides: FormatOverrides = {},
): TableSniff {
  const bom = bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf
  const all = headLines(bytes, bom ? 3 : 0, complete, SAMPLE_LINES)
  const commentLines = countWhile(all, (l) => l.text.trim() === '' || l.text.startsWith('#'))
  const lines = all.slice(commentLines).filter((l) => l.text.trim() !== '')
  const first = lines[0]
  if (!first)
    throw new TableFormatError(
      'no_data',
      'The file holds no table lines (only comments or blank lines)',
    )
  const problems: string[] = []
  const lineOf = lineNumbers(all, bytes, bom)
  const detected = detectDelimiter(lines.slice(0, DETECTION_LINES))
  const delimiter = overrides.delimiter ?? detected
  if (delimiter !== detected) problems.push(delimiterMismatch(lines, delimiter, detected))
  const rows = lines.map((l) => splitRecord(l.text, delimiter))
  const hasHeader = overrides.hasHeader ?? !rows[0]!.every((f) => NUMBER.test(f))
  const dataLines = hasHeader ? lines.slice(1) : lines
  const dataRows = hasHeader ? rows.slice(1) : rows
  const columnCount = rows[0]!.length
  const header = hasHeader ? rows[0]! : rows[0]!.map((_, i) => `column_${i + 1}`)
  problems.push(...fieldCountProblems(dataLines, dataRows, columnCount, lineOf))
  const dataStart = hasHeader ? (lines[1] ?? { start: first.end + 1 }).start : first.start
  return {
    compression,
    delimiter,
    decimalMark: overrides.decimalMark ?? detectDecimalMark(dataRows, delimiter),
    hasHeader,
    bom,
    lineEnding: bytes[first.end - 1] === 13 ? 'crlf' : 'lf',
    commentLines,
    dataOffset: Math.min(dataStart, bytes.length),
    dataStartLine: lineOf.get(dataStart) ?? (hasHeader ? 2 : 1) + commentLines,
    columnCount,
    header,
    sampleRows: dataRows.slice(0, SAMPLE_ROWS),
    averageRowBytes: averageBytes(dataLines),
    problems,
  }
}

/** The delimiter that splits the lines most consistently into numeric fields. */
function detectDelimiter(lines: HeadLine[]): Delimiter {
  let best: { delimiter: Delimiter; score: number[] } = { delimiter: ',', score: [-1] }
  for (const delimiter of DELIMITERS) {
    const rows = lines.map((l) => splitRecord(l.text, delimiter))
    const counts = rows.map((r) => r.length)
    const mode = modeOf(counts)
    if (mode < 2) continue
    const consistent = counts.filter((n) => n === mode).length / counts.length
    const body = rows.slice(1).flat()
    const numeric =
      body.filter((f) => NUMBER.test(f) || COMMA_NUMBER.test(f)).length / (body.length || 1)
    const score = [Math.round(consistent * 20), Math.round(numeric * 20), mode]
    if (compareScores(score, best.score) > 0) best = { delimiter, score }
  }
  return best.delimiter
}

function delimiterMismatch(lines: HeadLine[], declared: Delimiter, detected: Delimiter): string {
  const fields = (d: Delimiter) => modeOf(lines.map((l) => splitRecord(l.text, d).length))
  const name = (d: Delimiter) => (d === '\t' ? 'tab' : d === 'whitespace' ? 'whitespace' : `"${d}"`)
  return (
    `The declared delimiter ${name(declared)} splits the lines into ${fields(declared)} field(s), ` +
    `but ${name(detected)} splits them into ${fields(detected)}: the table looks ${name(detected)}-separated`
  )
}

function detectDecimalMark(rows: string[][], delimiter: Delimiter): '.' | ',' {
  if (delimiter === ',') return '.'
  const fields = rows.flat()
  const commas = fields.some((f) => COMMA_NUMBER.test(f))
  return commas && !fields.some((f) => /\d\.\d/.test(f)) ? ',' : '.'
}

function fieldCountProblems(
  lines: HeadLine[],
  rows: string[][],
  expected: number,
  line: Map<number, number>,
) {
  const odd = rows.flatMap((r, i) =>
    r.length === expected ? [] : [{ at: lines[i]!, n: r.length }],
  )
  if (odd.length === 0) return []
  const listed = odd.slice(0, 5).map((o) => `line ${line.get(o.at.start)} has ${o.n}`)
  return [
    `Inconsistent column counts: ${expected} expected; ${listed.join(', ')}${odd.length > 5 ? ', …' : ''}`,
  ]
}

/** 1-based line number of each sampled line's first byte (line feeds inside quotes count). */
function lineNumbers(lines: HeadLine[], bytes: Uint8Array, bom: boolean): Map<number, number> {
  const numbers = new Map<number, number>()
  let line = 1
  let from = bom ? 3 : 0
  for (const l of lines) {
    for (let q = bytes.indexOf(10, from); q >= 0 && q < l.start; q = bytes.indexOf(10, q + 1))
      line++
    from = l.start
    numbers.set(l.start, line)
  }
  return numbers
}

function countWhile<T>(items: T[], test: (item: T) => boolean) {
  const i = items.findIndex((item) => !test(item))
  return i < 0 ? items.length : i
}

function modeOf(values: number[]): number {
  const counts = new Map<number, number>()
  for (const v of values) counts.set(v, (counts.get(v) ?? 0) + 1)
  let mode = 0
  for (const [v, n] of counts) if (n > (counts.get(mode) ?? 0)) mode = v
  return mode
}

function compareScores(a: number[], b: number[]) {
  for (let i = 0; i < Math.max(a.length, b.length); i++) {
    const d = (a[i] ?? -1) - (b[i] ?? -1)
    if (d !== 0) return d
  }
  return 0
}

function averageBytes(lines: HeadLine[]) {
  const total = lines.reduce((sum, l) => sum + l.end + 1 - l.start, 0)
  return lines.length ? total / lines.length : 64
}
