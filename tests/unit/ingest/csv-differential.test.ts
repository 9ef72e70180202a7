// @vitest-environment node
/**
 * Differential test of our hand-written CSV reading against an independent parser from the npm
 * registry (csv-parse, RFC 4180 with its BOM and record-delimiter detection) on generated tables:
 * quoted fields with embedded delimiters, quotes and line breaks, a BOM, CRLF line ends, empty
 * optional fields and the many spellings of a decimal number. Random tables come from a fixed seed,
 * so a failure reproduces.
 */
import { readFileSync } from 'node:fs'
import { tableFromIPC } from 'apache-arrow'
import { parse } from 'csv-parse/sync'
import { afterAll, describe, expect, it } from 'vitest'
import type { ColumnMappingInput } from '@shared/schemas/localization-mapping.schema'
import { ingestLocalizationTable } from '@server/compute/ingest'
import { numbers, seeded, tempDir, pick, type Random } from './ingest-fixtures'

const tmp = tempDir()
afterAll(() => tmp.remove())

/** frame, x, y, a free-text note (ignored), photons (optional). */
const MAPPING: ColumnMappingInput = {
  frameBase: 0,
  columns: [
    { index: 0, role: 'frame' },
    { index: 1, role: 'x', unit: 'nm' },
    { index: 2, role: 'y', unit: 'nm' },
    { index: 3, role: 'ignore' },
    { index: 4, role: 'photons', unit: 'photons' },
  ],
}

/** A decimal number in one of the spellings tables use (signs, leading dot, exponents, zeros). */
function decimalText(random: Random): string {
  const value = (random() - 0.3) * 10 ** Math.floor(random() * 8 - 2)
  switch (Math.floor(random() * 8)) {
    case 0:
      return value.toExponential(Math.floor(random() * 6))
    case 1:
      return value.toExponential(3).toUpperCase()
    case 2:
      return String(Math.round(value))
    case 3:
      return value.toFixed(Math.floor(random() * 9))
    case 4:
      return `+${Math.abs(value).toFixed(2)}`
    case 5:
      return Math.abs(value) < 1 ? Math.abs(value).toFixed(4).replace(/^0/, '') : String(value)
    case 6:
      return `00${Math.abs(Math.round(value))}`
    default:
      return String(value)
  }
}

const NOTES = ['plain', 'has,comma', 'has "quotes"', 'two\nlines', 'crlf\r\ninside', '', ' spaced ']

/** A field as a writer would put it: quoted when it must be, and sometimes when it need not be. */
function field(text: string, random: Random): string {
  const mustQuote = /[",\r\n]/.test(text)
  return mustQuote || random() < 0.15 ? `"${text.replace(/"/g, '""')}"` : text
}

function generateTable(seed: number): string {
  const random = seeded(seed)
  const eol = random() < 0.5 ? '\r\n' : '\n'
  const rows = [['frame', 'x_nm', 'y_nm', 'note', 'photons'].map((h) => field(h, random))]
  for (let frame = 0; frame < 150; frame++) {
    const photons = random() < 0.1 ? '' : decimalText(random)
    const note = pick(random, NOTES)
    rows.push(
      [String(frame), decimalText(random), decimalText(random), note, photons].map((text) =>
        field(text, random),
      ),
    )
  }
  const body = rows.map((r) => r.join(',')).join(eol) + (random() < 0.7 ? eol : '')
  return (random() < 0.3 ? '\uFEFF' : '') + body
}

/** What the independent parser reads, as the numbers the ingest should store (by frame). */
function reference(text: string, float32: { x: boolean; y: boolean; photons: boolean }) {
  const records = parse(text, { bom: true, relax_column_count: false }) as string[][]
  const toNumber = (s: string, f32: boolean) => {
    if (s.trim() === '') return NaN
    const n = Number(s)
    return f32 ? Math.fround(n) : n
  }
  return records.slice(1).map((r) => ({
    frame: Number(r[0]),
    x: toNumber(r[1]!, float32.x),
    y: toNumber(r[2]!, float32.y),
    photons: toNumber(r[4]!, float32.photons),
  }))
}

async function ingestText(text: string, name: string) {
  const sourcePath = tmp.file(`${name}.csv`, text)
  const outputPath = tmp.path(`${name}.arrow`)
  const report = await ingestLocalizationTable({
    sourcePath,
    outputPath,
    mapping: MAPPING,
    tuning: { workers: 0 },
  })
  const table = tableFromIPC(readFileSync(outputPath))
  const isF32 = (n: string) => table.getChild(n)?.toArray() instanceof Float32Array
  const [frame, x, y, photons] = ['frame', 'x', 'y', 'photons'].map((n) => numbers(table, n))
  const rows = frame!.map((f, i) => ({ frame: f, x: x![i]!, y: y![i]!, photons: photons![i]! }))
  rows.sort((a, b) => a.frame - b.frame)
  return { report, rows, float32: { x: isF32('x'), y: isF32('y'), photons: isF32('photons') } }
}

describe('reading CSV, against csv-parse on the same bytes', () => {
  it('agrees on a hand-made table with every awkward case', async () => {
    const text =
      '\uFEFFframe,x_nm,y_nm,note,photons\r\n' +
      '0,1.5,-2.25,"a, b",1e3\r\n' +
      '1,".5","5.","say ""hi""",\r\n' +
      '2,+3,-0,"two\r\nlines",00012\r\n' +
      '3,1E-7,-.25,,"  4.5"\r\n'
    const ours = await ingestText(text, 'hand-made')
    expect(ours.report.rowsRejected).toBe(0)
    const expected = reference(text, ours.float32)
    expect(ours.rows).toEqual(expected)
  })

  it.each(Array.from({ length: 25 }, (_, i) => 1000 + i))(
    'agrees on random table %i (fixed seed)',
    async (seed) => {
      const text = generateTable(seed)
      const ours = await ingestText(text, `random-${seed}`)
      expect(ours.report.rowsRejected).toBe(0)
      expect(ours.report.rowsRead).toBe(150)
      expect(ours.rows).toEqual(reference(text, ours.float32))
    },
  )
})
