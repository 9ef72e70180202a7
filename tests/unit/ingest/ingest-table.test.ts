// @vitest-environment node
import { readFileSync } from 'node:fs'
import { gzipSync } from 'node:zlib'
import { tableFromIPC } from 'apache-arrow'
import { afterAll, describe, expect, it } from 'vitest'
import { ZodError } from 'zod'
import {
  ingestLocalizationTable,
  prestartParseWorkers,
  TableFormatError,
  type IngestOptions,
} from '@server/compute/ingest'
import { FXYP, numbers, tempDir } from './ingest-fixtures'

const tmp = tempDir()
afterAll(() => tmp.remove())
let n = 0

async function ingest(content: string | Uint8Array, options: Partial<IngestOptions> = {}) {
  const sourcePath = tmp.file(`in${n}.csv`, content)
  const outputPath = tmp.path(`out${n++}.arrow`)
  const report = await ingestLocalizationTable({
    sourcePath,
    outputPath,
    mapping: FXYP,
    ...options,
  })
  const table = tableFromIPC(readFileSync(outputPath))
  const column = (name: string) => numbers(table, name)
  return { report, table, column, outputPath }
}

const XY_PX = {
  frameBase: 1 as const,
  pixelSizeNm: 107,
  columns: [
    { index: 0, role: 'x' as const, unit: 'px' as const },
    { index: 1, role: 'y' as const, unit: 'um' as const },
  ],
}

describe('ingestLocalizationTable: values', () => {
  it('converts px with the pixel size and µm × 1000 to nm', async () => {
    // 12.5 px × 107 nm/px = 1337.5 nm; 1.25 µm = 1250 nm (both exact in Float32).
    const { column, report } = await ingest('x [px],y [um]\n12.5,1.25\n', { mapping: XY_PX })
    expect(column('x')).toEqual([1337.5])
    expect(column('y')).toEqual([1250])
    expect(report.columns.map((c) => [c.name, c.sourceUnit, c.unit])).toEqual([
      ['x', 'px', 'nm'],
      ['y', 'um', 'nm'],
    ])
  })

  it('stores frames from 0, photons as given, and a small channel as Uint8', async () => {
    const mapping = { ...FXYP, columns: [...FXYP.columns, { index: 4, role: 'channel' as const }] }
    const { column, table, report } = await ingest('f,x,y,p,c\n1,1,2,500.5,0\n3,4,5,600,2\n', {
      mapping,
    })
    expect(column('frame')).toEqual([0, 2])
    expect(column('photons')).toEqual([500.5, 600])
    expect(String(table.schema.fields.find((f) => f.name === 'channel')?.type)).toBe('Uint8')
    expect(report.frames).toEqual({ first: 0, last: 2, sourceBase: 1 })
  })

  it('keeps photons in ADU as given and says so', async () => {
    const mapping = {
      ...FXYP,
      columns: [
        ...FXYP.columns.slice(0, 3),
        { index: 3, role: 'photons' as const, unit: 'adu' as const },
      ],
    }
    const { column, report } = await ingest('f,x,y,p\n1,1,2,5100\n', { mapping })
    expect(column('photons')).toEqual([5100])
    expect(report.aduColumns).toEqual(['p'])
    expect(report.problems.join(' ')).toContain('is in ADU and is stored as given')
  })
})

describe('ingestLocalizationTable: rejected rows', () => {
  const lines = [
    'frame,x,y,photons',
    '1,10,20,100',
    '2,abc,20,100',
    '3,10,NaN,100',
    '4,-Infinity,20,100',
    '5,10,20',
    '6,,20,100',
    '0,10,20,100',
    '7.5,10,20,100',
    '',
    '8,10,20,',
    '9,10,20,nan',
    '10,-5,20,1e3',
    '"11"," 12.5 ","20","100"',
    '12,"1,5",20,100',
    '13,1e400,20,100',
    '14,10,20,100,99',
  ]

  it('counts them by reason, with the 1-based source line and the offending text', async () => {
    const { report, column } = await ingest(`${lines.join('\n')}\n`)
    expect(report).toMatchObject({ rowsRead: 15, rowsAccepted: 5, rowsRejected: 10, blankLines: 1 })
    const seen = Object.fromEntries(
      Object.entries(report.rejected).map(([r, t]) => [r, t.examples.map((e) => [e.line, e.text])]),
    )
    expect(seen).toEqual({
      field_count: [
        [6, '4 expected, 3 found: 5,10,20'],
        [17, '4 expected, 5 found: 14,10,20,100,99'],
      ],
      not_a_number: [
        [3, 'abc'],
        [15, '"1,5"'],
      ],
      nan: [[4, 'NaN']],
      infinite: [
        [5, '-Infinity'],
        [16, '1e400'],
      ],
      empty_required: [[7, '']],
      negative_frame: [[8, '0']],
      non_integer: [[9, '7.5']],
    })
    expect(report.rejected.not_a_number?.examples[0]?.column).toBe('x')
    expect(column('frame')).toEqual([0, 7, 8, 9, 10])
    expect(column('x')).toEqual([10, 10, 10, -5, 12.5])
    expect(column('photons')).toEqual([100, NaN, NaN, 1000, 100])
    expect(report.columns.find((c) => c.name === 'photons')).toMatchObject({
      count: 3,
      missing: 2,
      min: 100,
      max: 1000,
    })
    expect(report.problems).toContain(
      '1 row(s) have frame 0 while frames are declared to count from 1',
    )
  })

  it('gives the same counts and lines when parsed in small chunks on worker threads', async () => {
    const body = Array.from({ length: 300 }, () => lines.slice(1).join('\n')).join('\n')
    const inline = await ingest(`${lines[0]}\n${body}\n`, {
      tuning: { workers: 0, chunkBytes: 512 },
    })
    const threaded = await ingest(`${lines[0]}\n${body}\n`, {
      tuning: { workers: 2, chunkBytes: 512 },
    })
    expect(threaded.report.rejected).toEqual(inline.report.rejected)
    expect(threaded.report.rowsAccepted).toBe(1500)
    expect(threaded.report.rejected.nan?.examples.map((e) => e.line)).toEqual([4, 20, 36, 52, 68])
    expect(threaded.column('x')).toEqual(inline.column('x'))
  })

  it('reports a declared delimiter that does not split the lines', async () => {
    const { report } = await ingest('frame,x,y,photons\n1,2,3,4\n2,3,4,5\n', {
      format: { delimiter: ';' },
    })
    expect(report.rowsAccepted).toBe(0)
    expect(report.rejected.field_count?.count).toBe(2)
    expect(report.problems).toContain(
      'The declared delimiter ";" splits the lines into 1 field(s), but "," splits them into 4: the table looks ","-separated',
    )
    expect(report.problems).toContain('The mapping uses column 4, but the lines have 1 field(s)')
  })
})

describe('ingestLocalizationTable: text forms', () => {
  it('reads quoted fields with line breaks (RFC 4180) across chunk boundaries, and counts their lines', async () => {
    const row = (i: number) => `${i},"${i}.5",2,"a ""quoted""\nnote, two lines"`
    const text = `frame,x,y,note\n${Array.from({ length: 200 }, (_, i) => row(i + 1)).join('\r\n')}\r\n9999,bad,2,x\n`
    const mapping = {
      frameBase: 1 as const,
      columns: [
        { index: 0, role: 'frame' as const },
        { index: 1, role: 'x' as const, unit: 'nm' as const },
        { index: 2, role: 'y' as const, unit: 'nm' as const },
      ],
    }
    const { report, column } = await ingest(text, {
      mapping,
      tuning: { workers: 2, chunkBytes: 300 },
    })
    expect(report.rowsAccepted).toBe(200)
    expect(column('x').slice(0, 3)).toEqual([1.5, 2.5, 3.5])
    // Header on line 1, 200 records of two lines each, so the bad record starts on line 402.
    expect(report.rejected.not_a_number?.examples[0]).toMatchObject({ line: 402, text: 'bad' })
  })

  it('reads gzip input, a byte-order mark, CRLF and a whitespace-separated table', async () => {
    const text =
      '\ufeff  frame   x     y    photons\r\n   1   10.5   20   100\r\n   2   -3e2   4    5\r\n'
    const { report, column } = await ingest(gzipSync(text))
    expect(report.format).toMatchObject({
      compression: 'gzip',
      bom: true,
      delimiter: 'whitespace',
      lineEnding: 'crlf',
    })
    // Rows come out tile by tile: (-300, 4) lies in the first tile, (10.5, 20) in the second.
    expect(column('x')).toEqual([-300, 10.5])
    expect(column('frame')).toEqual([1, 0])
  })

  it('reads a decimal comma', async () => {
    const { column } = await ingest('frame;x;y;photons\n1;10,5;20,25;100\n')
    expect(column('y')).toEqual([20.25])
  })

  it('reports progress at least every ~2 % of the input, ending at 1', async () => {
    const text = `frame,x,y,photons\n${Array.from({ length: 5000 }, (_, i) => `${i + 1},${i},${i},1`).join('\n')}\n`
    const seen: number[] = []
    await ingest(text, {
      onProgress: (f) => seen.push(f),
      tuning: { chunkBytes: Math.ceil(text.length / 60) },
    })
    expect(seen.at(-1)).toBe(1)
    expect(seen).toEqual([...seen].sort((a, b) => a - b))
    // Reading and parsing the bytes is the first 90 % of the bar, one call per chunk at least.
    const parsing = [0, ...seen.filter((f) => f <= 0.9)]
    const gaps = parsing.slice(1).map((f, i) => f - parsing[i]!)
    expect(parsing.at(-1)).toBeCloseTo(0.9)
    expect(Math.max(...gaps)).toBeLessThanOrEqual(0.9 * 0.02)
  })
})

describe('ingestLocalizationTable: refusals', () => {
  it('refuses a mapping without x and y in words', async () => {
    const mapping = {
      frameBase: 1,
      columns: [
        { index: 0, role: 'frame' },
        { index: 1, role: 'photons', unit: 'photons' },
      ],
    }
    const error: unknown = await ingest('frame,photons\n1,2\n', { mapping } as never).catch(
      (e: unknown) => e,
    )
    expect(error).toBeInstanceOf(ZodError)
    expect((error as ZodError).issues.map((i) => i.message)).toEqual([
      'Map one column to x',
      'Map one column to y',
    ])
  })

  it('refuses a 0-byte file and a 10 MB line', async () => {
    await expect(ingest('')).rejects.toMatchObject({ code: 'empty' })
    const long = `frame,x,y,photons\n1,2,3,4\n${'9'.repeat(10 << 20)}\n`
    const error: unknown = await ingest(long).catch((e: unknown) => e)
    expect(error).toBeInstanceOf(TableFormatError)
    expect(error).toMatchObject({
      code: 'line_too_long',
      message: 'A line longer than 1 MiB starts near byte 26 of the table text',
    })
  })

  it('stops its worker threads cleanly on a failure, and the next ingest runs', async () => {
    const rows = Array.from({ length: 3000 }, (_, i) => `${i + 1},${i},${i},1`).join('\n')
    const broken = `frame,x,y,photons\n${rows}\n${'7'.repeat(2 << 20)}\n${rows}\n`
    const tuning = { workers: 2, chunkBytes: 4096 }
    await expect(ingest(broken, { tuning })).rejects.toMatchObject({ code: 'line_too_long' })
    const { report } = await ingest(`frame,x,y,photons\n${rows}\n`, { tuning })
    expect(report.rowsAccepted).toBe(3000)
    // Both workers went back to the pool; prestarting finds them there.
    expect(prestartParseWorkers(2)).toBe(2)
  })
})
