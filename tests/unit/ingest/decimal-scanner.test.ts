// @vitest-environment node
import { readFileSync } from 'node:fs'
import { tableFromIPC } from 'apache-arrow'
import { describe, expect, it } from 'vitest'
import { ingestLocalizationTable } from '@server/compute/ingest'
import { scanDecimal, scannedValue } from '@server/compute/ingest/decimal.scanner'
import { numbers, seeded, tempDir } from './ingest-fixtures'

const encoder = new TextEncoder()
const POINT = 46
const COMMA = 44

/** The scanner's value, or null when it declines the text. */
function scan(text: string, mark = POINT): number | null {
  const bytes = encoder.encode(`${text}\n`)
  const end = scanDecimal(bytes, 0, mark)
  return end === text.length ? scannedValue[0]! : end < 0 ? null : NaN
}

/** Random decimal text in the forms tables use: signs, leading zeros, fractions, exponents. */
function randomDecimal(random: () => number): string {
  const digits = (n: number) => Array.from({ length: n }, () => Math.floor(random() * 10)).join('')
  const sign = ['', '', '-', '+'][Math.floor(random() * 4)]!
  const whole = digits(Math.floor(random() * 10))
  const fraction = random() < 0.7 ? `.${digits(Math.floor(random() * 11))}` : ''
  const mantissa = whole + fraction === '' || whole + fraction === '.' ? '0' : whole + fraction
  const exponent =
    random() < 0.3
      ? `${random() < 0.5 ? 'e' : 'E'}${['', '-', '+'][Math.floor(random() * 3)]}${digits(1 + Math.floor(random() * 2))}`
      : ''
  return `${sign}${mantissa}${exponent}`
}

describe('scanDecimal', () => {
  it('gives exactly the double Number() gives, on 100 000 random decimal texts', () => {
    // Reference: ECMAScript's StringToNumber, which rounds the decimal value correctly.
    const random = seeded(20_240_601)
    const wrong: string[] = []
    let checked = 0
    for (let i = 0; i < 100_000; i++) {
      const text = randomDecimal(random)
      const expected = Number(text)
      if (Number.isNaN(expected)) continue
      if (!Object.is(scan(text), expected)) wrong.push(text)
      checked++
    }
    expect(wrong).toEqual([])
    expect(checked).toBeGreaterThan(95_000)
  })

  it('matches Number() on long mantissas and exponents beyond the fast path', () => {
    for (const text of [
      '3.432769921875000000e+04',
      '12345678901234567890',
      '1e23',
      '1e-23',
      '4.9e-324',
      '1.7976931348623157e308',
      '0.1000000000000000055511151231257827',
      '123456789012345.6',
    ]) {
      expect(scan(text), text).toBe(Number(text))
    }
  })

  it('keeps the sign of zero', () => {
    expect(Object.is(scan('-0'), -0)).toBe(true)
    expect(Object.is(scan('-0.0e5'), -0)).toBe(true)
  })

  it('declines what is not a decimal number', () => {
    for (const text of ['', '.', '-', '+', 'e5', '.e5', 'abc', 'NaN', 'Infinity', '1e', '1e+']) {
      expect(scan(text), text).toBeNull()
    }
    // These stop early; the parser then sees a byte that cannot end a field and looks closer.
    for (const text of ['0x1A', '12abc', '1.5.5', '1_000']) expect(scan(text), text).toBeNaN()
  })

  it('reads a decimal comma when asked', () => {
    expect(scan('12,5', COMMA)).toBe(12.5)
    expect(scan('-0,001e3', COMMA)).toBe(-1)
  })
})

describe('the table parser', () => {
  it('stores exactly Number(text) in a Float64 column, whichever path reads the field', async () => {
    // Reference: Number(); texts from 1 to 20 digits, signs and exponents, so the int32 hot path,
    // the exact double scanner and the Number() fallback are all exercised.
    const tmp = tempDir()
    try {
      const random = seeded(99)
      const texts = Array.from({ length: 20_000 }, () => randomDecimal(random)).filter((t) =>
        Number.isFinite(Number(t)),
      )
      const sourcePath = tmp.file(
        'values.csv',
        `x,y,value\n${texts.map((t) => `1,2,${t}`).join('\n')}\n`,
      )
      const outputPath = tmp.path('values.arrow')
      const mapping = {
        frameBase: 1 as const,
        columns: [
          { index: 0, role: 'x' as const, unit: 'nm' as const },
          { index: 1, role: 'y' as const, unit: 'nm' as const },
          { index: 2, role: 'other' as const },
        ],
      }
      const report = await ingestLocalizationTable({ sourcePath, outputPath, mapping })
      expect(report.rowsAccepted).toBe(texts.length)
      const stored = numbers(tableFromIPC(readFileSync(outputPath)), 'value')
      const wrong = texts.filter((t, i) => !Object.is(stored[i], Number(t)))
      expect(wrong).toEqual([])
    } finally {
      tmp.remove()
    }
  })
})
