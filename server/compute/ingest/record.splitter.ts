/**
 * Splits one record's text into fields (RFC 4180 quoting: a field that starts with `"` runs to the
 * next lone `"`, and `""` inside stands for one quote). The slow, string-based companion of the
 * byte parser, used on samples and on rejected lines.
 */
import type { Delimiter } from './table-format.types'

export function splitRecord(text: string, delimiter: Delimiter): string[] {
  const line = text.replace(/\r$/, '')
  return delimiter === 'whitespace' ? splitOnWhitespace(line) : splitOn(line, delimiter)
}

function splitOn(line: string, delimiter: string): string[] {
  const fields: string[] = []
  let i = 0
  for (;;) {
    const [field, end] = readField(line, i, (c) => c === delimiter)
    fields.push(field)
    if (end >= line.length) return fields
    i = end + 1
  }
}

function splitOnWhitespace(line: string): string[] {
  const fields: string[] = []
  const isPad = (c: string) => c === ' ' || c === '\t'
  let i = 0
  for (;;) {
    while (i < line.length && isPad(line[i]!)) i++
    if (i >= line.length) return fields
    const [field, end] = readField(line, i, isPad)
    fields.push(field)
    i = end
  }
}

/** One field from `start`: its text (quotes removed) and the index of the byte that ended it. */
function readField(line: string, start: number, ends: (c: string) => boolean): [string, number] {
  let i = start
  while (i < line.length && (line[i] === ' ' || line[i] === '\t') && !ends(line[i]!)) i++
  if (line[i] !== '"') {
    let end = start
    while (end < line.length && !ends(line[end]!)) end++
    return [line.slice(start, end).trim(), end]
  }
  let text = ''
  let j = i + 1
  for (;;) {
    const close = line.indexOf('"', j)
    if (close < 0) return [text + line.slice(j), line.length]
    if (line[close + 1] === '"') {
      text += line.slice(j, close + 1)
      j = close + 2
      continue
    }
    text += line.slice(j, close)
    let end = close + 1
    while (end < line.length && !ends(line[end]!)) end++
    return [text + line.slice(close + 1, end).trim(), end]
  }
}
