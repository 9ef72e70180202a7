// @vitest-environment node
/**
 * The parser's WebAssembly fast path (server/compute/ingest/assembly/plain-rows.ts): the module
 * kept in the repository is what its source compiles to; on clean rows it stores every row, each
 * value the correctly rounded double of its text as ECMAScript's Number() reads it (a reference
 * outside our code), rounded to float32 as the store keeps it; and on tables mixing clean rows
 * with every kind it declines (quotes, padding, words, empty and missing fields, long mantissas,
 * large exponents, integers out of range, blank lines, CRLF), the parser with it gives exactly
 * what the parser without it gives: the same columns (bit for bit), rows, lines and rejections.
 * Random tables come from fixed seeds, so a failure reproduces.
 */
import { readFileSync } from 'node:fs'
import { fileURLToPath } from 'node:url'
import { describe, expect, it } from 'vitest'
import { columnMappingSchema } from '@shared/schemas/localization-mapping.schema'
import type { ColumnMappingInput } from '@shared/schemas/localization-mapping.schema'
import { ChunkParser } from '@server/compute/ingest/chunk.parser'
import { ChunkProcessor } from '@server/compute/ingest/chunk.processor'
import { planGrid } from '@server/compute/store/tile.grid'
import { buildParsePlan } from '@server/compute/ingest/parse-plan'
import { buildPlainRowsModule, PLAIN_ROWS_MODULE } from '@server/cli/wasm-modules'
import { PlainRows } from '@server/compute/ingest/plain-rows'
import { SlotColumns } from '@server/compute/ingest/slot.columns'
import type { Delimiter, TableFormat } from '@server/compute/ingest/table-format.types'
import { seeded, pick, type Random } from './ingest-fixtures'

/** frame (1-based), x in µm, y in nm, a note (not read), photons (optional), channel, other. */
const MAPPING: ColumnMappingInput = {
  frameBase: 1,
  columns: [
    { index: 0, role: 'frame' },
    { index: 1, role: 'x', unit: 'um' },
    { index: 2, role: 'y', unit: 'nm' },
    { index: 3, role: 'ignore' },
    { index: 4, role: 'photons', unit: 'photons' },
    { index: 5, role: 'channel' },
    { index: 6, role: 'other' },
  ],
}
const FIELDS = 7

function planFor(delimiter: Delimiter, decimalMark: '.' | ',' = '.') {
  const format = {
    delimiter,
    decimalMark,
    columnCount: FIELDS,
    header: ['frame', 'x_um', 'y_nm', 'note', 'photons', 'channel', 'score'],
  } as unknown as TableFormat
  return buildParsePlan(columnMappingSchema.parse(MAPPING), format, 40)
}

/** A number as fitting software writes one: fixed digits, signs, a leading dot, exponents. */
function plainNumber(random: Random): string {
  const value = (random() - 0.2) * 10 ** Math.floor(random() * 7 - 2)
  switch (Math.floor(random() * 7)) {
    case 0:
      return value.toExponential(Math.floor(random() * 5))
    case 1:
      return value.toExponential(2).toUpperCase()
    case 2:
      return `+${Math.abs(value).toFixed(2)}`
    case 3:
      return Math.abs(value) < 1 ? Math.abs(value).toFixed(4).replace(/^0/, '') : value.toFixed(1)
    case 4:
      return `${Math.round(Math.abs(value))}.`
    default:
      return value.toFixed(Math.floor(random() * 7))
  }
}

/** What the fast path declines, field by field, beside a clean value. */
const DECLINED: ((random: Random) => string)[] = [
  (r) => ` ${plainNumber(r)} `,
  (r) => `"${plainNumber(r)}"`,
  () => '',
  (r) => pick(r, ['NaN', 'abc', 'inf', '-', '1.2.3', '5e', '0x10']),
  () => '1234567890.12345678',
  () => '1.5e30',
  () => '-3',
  () => '2.5',
  () => '99999999999',
]

function row(random: Random, delimiter: string, decimalMark: string, messy: boolean): string {
  const fields = [
    String(1 + Math.floor(random() * 5000)),
    plainNumber(random),
    plainNumber(random),
    pick(random, ['ok', '', 'a "quoted" note', 'x']),
    plainNumber(random),
    String(Math.floor(random() * 3)),
    plainNumber(random),
  ]
  if (messy && random() < 0.3)
    fields[Math.floor(random() * FIELDS)] = pick(random, DECLINED)(random)
  if (messy && random() < 0.1)
    fields[3] = pick(random, [`"12${delimiter}5"`, `"a${delimiter}b"`, '"two\nlines"', '"quoted"'])
  if (messy && random() < 0.05) fields.push(pick(random, ['extra', '9']))
  if (messy && random() < 0.05) fields.splice(Math.floor(random() * FIELDS), 1)
  const text = fields.map((f) => (decimalMark === ',' ? f.replace('.', ',') : f))
  const end = messy && random() < 0.1 ? '\r\n' : '\n'
  if (messy && random() < 0.03)
    return pick(random, ['\n', '   \n', '\r\n']) + text.join(delimiter) + end
  return text.join(delimiter) + end
}

function table(seed: number, rows: number, delimiter: string, decimalMark: string, messy: boolean) {
  const random = seeded(seed)
  return Array.from({ length: rows }, () => row(random, delimiter, decimalMark, messy)).join('')
}

const bytes = (text: string) => new Uint8Array(Buffer.from(text, 'latin1'))

function parseBoth(plan: ReturnType<typeof planFor>, text: string) {
  const fast = new ChunkParser(plan).parse(bytes(text))
  const fastColumns = fast.columns.map((c) => Array.from(c))
  const slow = new ChunkParser(plan, { fastPath: false }).parse(bytes(text))
  return {
    fast: { ...fast, columns: fastColumns },
    slow: { ...slow, columns: slow.columns.map((c) => Array.from(c)) },
  }
}

describe('the WebAssembly fast path of the chunk parser', () => {
  it('is, as kept in the repository, what assembly/plain-rows.ts compiles to', async () => {
    const kept = readFileSync(fileURLToPath(PLAIN_ROWS_MODULE), 'utf8')
    expect(kept, 'run `npm run build:wasm` after changing the AssemblyScript source').toBe(
      await buildPlainRowsModule(),
    )
  })

  it.each([
    [',', '.'],
    [';', ','],
    ['\t', '.'],
  ] as const)(
    'stores every clean row itself (%j), each value as Number() reads it, in float32',
    (d, mark) => {
      const plan = planFor(d, mark)
      const text = table(11, 5_000, d, mark, false)
      const plain = PlainRows.for(plan)!
      const columns = new SlotColumns(plan, plain)
      plain.load(bytes(text))
      columns.reset(6_000)
      const end = plain.parse(0, 0, columns.capacity)
      expect(end).toBe(text.length)
      expect(plain.rows).toBe(5_000)
      const stored = columns.take(5_000)
      const lines = text
        .trimEnd()
        .split('\n')
        .map((l) => l.split(d))
      const slot = (role: string) => plan.slots.findIndex((s) => s.role === role)
      const read = (i: number, field: number) => Number(lines[i]![field]!.replace(',', '.'))
      lines.forEach((_, i) => {
        expect(stored[slot('frame')]![i]).toBe(read(i, 0) - 1)
        expect(stored[slot('x')]![i]).toBe(Math.fround(read(i, 1) * 1000))
        expect(stored[slot('y')]![i]).toBe(Math.fround(read(i, 2)))
        expect(stored[slot('photons')]![i]).toBe(Math.fround(read(i, 4)))
        expect(stored[slot('channel')]![i]).toBe(read(i, 5))
        expect(stored[slot('other')]![i]).toBe(read(i, 6))
      })
    },
  )

  it.each([
    ['commas', ',', '.', 1],
    ['semicolons with decimal commas', ';', ',', 2],
    ['tabs', '\t', '.', 3],
    ['commas, another table', ',', '.', 4],
  ] as const)(
    'reads a messy table with %s exactly as the parser without it',
    (_, d, mark, seed) => {
      const plan = planFor(d, mark)
      const { fast, slow } = parseBoth(plan, table(seed, 4_000, d, mark, true))
      expect(slow.rows).toBeGreaterThan(2_000)
      expect(Object.keys(slow.rejections).length).toBeGreaterThan(3)
      expect(fast).toEqual(slow)
    },
  )

  it('leaves a quoted field to the parser, even where splitting it would fit the row', () => {
    // Two notes between frame and position; the second row is one field short, which only
    // reading the quotes shows (splitting at the quoted comma would make it whole).
    const mapping = columnMappingSchema.parse({
      frameBase: 0,
      columns: [
        { index: 0, role: 'frame' },
        { index: 3, role: 'x', unit: 'nm' },
        { index: 4, role: 'y', unit: 'nm' },
      ],
    })
    const format = { delimiter: ',', decimalMark: '.', columnCount: 5, header: [] }
    const plan = buildParsePlan(mapping, format as unknown as TableFormat, 20)
    const { fast, slow } = parseBoth(plan, '1,"a,b",c,2,3\n2,"a,b",2,3\n3,a,b,4,5\n')
    expect(slow.rows).toBe(2)
    expect(slow.rejections.field_count?.count).toBe(1)
    expect(fast).toEqual(slow)
  })

  it.each([
    ['a grid over the rows', 0],
    ['a grid that leaves rows outside', 0.3],
  ])('groups a chunk by tile on %s exactly as the TypeScript loops do', (_, shrink) => {
    const plan = planFor(',')
    const text = bytes(table(5, 6_000, ',', '.', true))
    // x is in µm (×1000 to nm) and y in nm: the rows span about ±1e7 nm in x and ±1e4 in y.
    const extent = { xMin: -2e6, xMax: 8e6 * (1 - shrink), yMin: -2e3, yMax: 8e3 * (1 - shrink) }
    const grid = planGrid(extent, 6_000, 200)
    expect(grid.columns * grid.rows).toBeGreaterThan(20)
    const fast = new ChunkProcessor(plan).process(0, text, grid)
    const slow = new ChunkProcessor(plan, { fastPath: false }).process(0, text, grid)
    expect(fast.summary.rows).toBeGreaterThan(3_000)
    if (shrink > 0) expect(fast.summary.outside).toBeGreaterThan(100)
    expect(fast).toEqual(slow)
  })

  it('grows its columns past a short first guess and keeps the rows stored before', () => {
    // rowBytesHint 40 sizes for ~1.25 rows per 40 bytes; short rows overflow that guess.
    const plan = planFor(',')
    const text = Array.from({ length: 3_000 }, (_, i) => `${i + 1},${i},${-i},,1,0,${i / 4}\n`)
    const { fast, slow } = parseBoth(plan, text.join(''))
    expect(fast.rows).toBe(3_000)
    expect(fast).toEqual(slow)
  })
})
