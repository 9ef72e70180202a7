/**
 * The slow path for one field's text: whatever the byte scanner did not take. Decides between a
 * number (then `Number()` gives the value), an empty value, a not-a-number marker, an infinity and
 * plain text, so that rejected rows can be counted by what is wrong with them.
 */

export type FieldValue =
  { kind: 'number'; value: number } | { kind: 'empty' | 'nan' | 'infinite' | 'text' }

const POINT_DECIMAL = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/
const COMMA_DECIMAL = /^[+-]?(?:\d+,?\d*|,\d+)(?:[eE][+-]?\d+)?$/
/** Spellings of "no value" that spreadsheet and data-frame exports write (common practice). */
const NAN_WORDS = new Set(['nan', 'na', 'n/a', 'null', 'none'])
const INFINITY_WORDS = new Set(['inf', 'infinity', 'infinite'])

export function classifyFieldText(text: string, decimalMark: '.' | ','): FieldValue {
  const t = text.trim()
  if (t === '') return { kind: 'empty' }
  if (decimalMark === '.' ? POINT_DECIMAL.test(t) : COMMA_DECIMAL.test(t)) {
    const value = Number(decimalMark === '.' ? t : t.replace(',', '.'))
    return Number.isFinite(value) ? { kind: 'number', value } : { kind: 'infinite' }
  }
  const word = t.toLowerCase().replace(/^[+-]/, '')
  if (NAN_WORDS.has(word)) return { kind: 'nan' }
  if (INFINITY_WORDS.has(word)) return { kind: 'infinite' }
  return { kind: 'text' }
}
