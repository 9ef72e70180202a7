// @vitest-environment node
import { gzipSync } from 'node:zlib'
import { afterAll, describe, expect, it } from 'vitest'
import { sniffTable, TableFormatError } from '@server/compute/ingest'
import { tempDir } from './ingest-fixtures'

const tmp = tempDir()
afterAll(() => tmp.remove())
let n = 0
const table = (content: string | Uint8Array, name = `t${n++}.csv`) => tmp.file(name, content)

async function formatError(path: string): Promise<TableFormatError> {
  const error: unknown = await sniffTable(path).catch((e: unknown) => e)
  if (!(error instanceof TableFormatError))
    throw new Error(`expected a TableFormatError, got ${String(error)}`)
  return error
}

describe('sniffTable', () => {
  it.each([
    ['comma', 'frame,x,y\n1,2.5,3.5\n2,4,5\n', ','],
    ['tab', 'frame\tx [nm]\ty [nm]\n1\t2.5\t3.5\n2\t4\t5\n', '\t'],
    ['semicolon', 'frame;x;y\n1;2.5;3.5\n2;4;5\n', ';'],
    ['pipe', 'frame | x | y\n1 | 2.5 | 3.5\n2 | 4 | 5\n', '|'],
    ['whitespace', '  frame    x      y\n   1     2.5   3.5\n   2     4     5\n', 'whitespace'],
  ])('detects the %s delimiter', async (_name, content, delimiter) => {
    const sniff = await sniffTable(table(content))
    expect(sniff).toMatchObject({ delimiter, hasHeader: true, columnCount: 3, dataStartLine: 2 })
    expect(sniff.header[0]).toBe('frame')
    expect(sniff.sampleRows[0]).toEqual(['1', '2.5', '3.5'])
  })

  it('respects quotes: a quoted delimiter and a quoted line break do not split (RFC 4180, 2.6)', async () => {
    // RFC 4180 section 2: fields with commas, double quotes or line breaks are enclosed in
    // double quotes, and a quote inside is written twice ("b""bb").
    const sniff = await sniffTable(table('"x, nm","y ""nm""",note\n1,2,"a\nb"\n3,4,"c,d"\n'))
    expect(sniff.delimiter).toBe(',')
    expect(sniff.header).toEqual(['x, nm', 'y "nm"', 'note'])
    expect(sniff.sampleRows).toEqual([
      ['1', '2', 'a\nb'],
      ['3', '4', 'c,d'],
    ])
    expect(sniff.problems).toEqual([])
  })

  it('skips a UTF-8 byte-order mark (EF BB BF, the UTF-8 form of U+FEFF)', async () => {
    const sniff = await sniffTable(
      table(new Uint8Array([0xef, 0xbb, 0xbf, ...new TextEncoder().encode('x,y\n1,2\n')])),
    )
    expect(sniff).toMatchObject({ bom: true, header: ['x', 'y'], dataOffset: 7 })
  })

  it('recognizes gzip by its magic bytes (1f 8b, RFC 1952 2.3.1), whatever the name', async () => {
    const sniff = await sniffTable(table(gzipSync('x,y\r\n1,2\r\n3,4\r\n'), 'table.txt'))
    expect(sniff).toMatchObject({ compression: 'gzip', lineEnding: 'crlf', header: ['x', 'y'] })
    expect(sniff.sampleRows).toEqual([
      ['1', '2'],
      ['3', '4'],
    ])
  })

  it('reads CRLF line ends, comment lines and a table without header', async () => {
    const sniff = await sniffTable(table('# exported 2026-01-01\n# units: nm\n1,2,3\r\n4,5,6\r\n'))
    expect(sniff).toMatchObject({
      lineEnding: 'crlf',
      commentLines: 2,
      hasHeader: false,
      dataStartLine: 3,
    })
    expect(sniff.header).toEqual(['column_1', 'column_2', 'column_3'])
  })

  it('detects a decimal comma in a semicolon table', async () => {
    const sniff = await sniffTable(table('x;y\n1,5;2,25\n3,75;4,5\n'))
    expect(sniff).toMatchObject({ delimiter: ';', decimalMark: ',' })
  })

  it('names sampled lines whose field count differs from the header', async () => {
    const sniff = await sniffTable(table('x,y,z\n1,2,3\n4,5\n6,7,8,9\n'))
    expect(sniff.problems).toEqual([
      'Inconsistent column counts: 3 expected; line 3 has 2, line 4 has 4',
    ])
  })

  it('says what is wrong with a declared delimiter that does not fit', async () => {
    const sniff = await sniffTable(table('x,y,z\n1,2,3\n'), { delimiter: ';' })
    expect(sniff.columnCount).toBe(1)
    expect(sniff.problems[0]).toBe(
      'The declared delimiter ";" splits the lines into 1 field(s), but "," splits them into 3: the table looks ","-separated',
    )
  })

  it('refuses a 0-byte file', async () => {
    expect(await formatError(table(''))).toMatchObject({
      code: 'empty',
      message: 'The file is empty (0 bytes)',
    })
  })

  it('refuses binary content and UTF-16 text', async () => {
    expect(
      (await formatError(table(new Uint8Array([0x49, 0x49, 0x2a, 0, 8, 0, 0, 0])))).message,
    ).toBe('This is a TIFF image, not a text table')
    expect(await formatError(table(new Uint8Array(4096).map((_, i) => i % 7)))).toMatchObject({
      code: 'binary',
    })
    expect(await formatError(table(new Uint8Array([0xff, 0xfe, 0x78, 0])))).toMatchObject({
      code: 'encoding',
    })
  })

  it('refuses a single 10 MB line and says so', async () => {
    const error = await formatError(table('1,'.repeat(5_000_000)))
    expect(error.code).toBe('line_too_long')
    expect(error.message).toContain('No line break in the first 1 MiB')
  })

  it('refuses a file of comments only', async () => {
    expect(await formatError(table('# nothing here\n\n'))).toMatchObject({ code: 'no_data' })
  })
})
