// @vitest-environment node
import { readFileSync } from 'node:fs'
import { tableFromIPC, type Table } from 'apache-arrow'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ingestLocalizationTable, type IngestReport } from '@server/compute/ingest'
import {
  readTileIndex,
  readTilesInBox,
  StoreBoxReader,
  type BoxRows,
  type TileIndex,
} from '@server/compute/store'
import { numbers, seeded, tempDir } from './ingest-fixtures'

const tmp = tempDir()
const random = seeded(7)
const ROWS = 4000

/** Random number text in the forms exporters write: fixed decimals, exponents, signs. */
function numberText(value: number): string {
  const form = Math.floor(random() * 4)
  if (form === 0) return value.toFixed(Math.floor(random() * 5))
  if (form === 1) return value.toExponential(Math.floor(random() * 8))
  if (form === 2) return String(value)
  return value.toPrecision(1 + Math.floor(random() * 9))
}

const rows = Array.from({ length: ROWS }, (_, id) => ({
  id,
  frame: 1 + Math.floor(random() * 5000),
  x: numberText(-2000 + random() * 42_000),
  y: numberText(random() * 30_000),
  photons: numberText(Math.exp(6 + random() * 3)),
  channel: Math.floor(random() * 3),
}))
const text = `id,frame,x [nm],y [nm],photons,channel\n${rows.map((r) => `${r.id},${r.frame},${r.x},${r.y},${r.photons},${r.channel}`).join('\n')}\n`

const mapping = {
  frameBase: 1 as const,
  columns: [
    { index: 0, role: 'other' as const },
    { index: 1, role: 'frame' as const },
    { index: 2, role: 'x' as const, unit: 'nm' as const },
    { index: 3, role: 'y' as const, unit: 'nm' as const },
    { index: 4, role: 'photons' as const, unit: 'photons' as const },
    { index: 5, role: 'channel' as const },
  ],
}

let report: IngestReport
let table: Table
let index: TileIndex
const outputPath = tmp.path('out.arrow')

beforeAll(async () => {
  const sourcePath = tmp.file('in.csv', text)
  const tuning = { workers: 2, chunkBytes: 8192, rowsPerTile: 200 }
  report = await ingestLocalizationTable({ sourcePath, outputPath, mapping, tuning })
  table = tableFromIPC(readFileSync(outputPath))
  index = await readTileIndex(outputPath)
})
afterAll(() => tmp.remove())

const column = (name: string) => numbers(table, name)

describe('the Arrow output', () => {
  it('is an Arrow IPC file (magic ARROW1 at both ends, Arrow columnar format spec)', () => {
    const bytes = readFileSync(outputPath)
    expect(bytes.subarray(0, 6).toString('latin1')).toBe('ARROW1')
    expect(bytes.subarray(-6).toString('latin1')).toBe('ARROW1')
    expect(table.schema.fields.map((f) => [f.name, String(f.type)])).toEqual([
      ['frame', 'Uint32'],
      ['x', 'Float32'],
      ['y', 'Float32'],
      ['photons', 'Float32'],
      ['channel', 'Uint8'],
      ['id', 'Float64'],
    ])
    expect(table.schema.fields[1]?.metadata.get('unit')).toBe('nm')
  })

  it('holds every input row with its values, read back with apache-arrow', () => {
    // Float32 columns hold the input rounded once to binary32 (relative error ≤ 2^-24):
    // Math.fround(Number(text)) is that rounding (IEEE 754 round-to-nearest-even).
    expect(report.rowsAccepted).toBe(ROWS)
    const ids = column('id')
    const [frame, x, y, photons, channel] = ['frame', 'x', 'y', 'photons', 'channel'].map(column)
    const wrong: number[] = []
    ids.forEach((id, i) => {
      const r = rows[id]!
      const same =
        frame![i] === r.frame - 1 &&
        x![i] === Math.fround(Number(r.x)) &&
        y![i] === Math.fround(Number(r.y)) &&
        photons![i] === Math.fround(Number(r.photons)) &&
        channel![i] === r.channel
      if (!same) wrong.push(id)
    })
    expect(wrong).toEqual([])
    expect([...ids].sort((a, b) => a - b)).toEqual(rows.map((r) => r.id))
  })

  it('is ordered by tile, one record batch per tile, as the index says', () => {
    expect(table.batches.length).toBe(index.tiles.length)
    expect(index.tiles.length).toBeGreaterThan(10)
    const { originX, originY, tileSizeNm, columns, rows: gridRows } = index.grid
    const cell = (v: number, o: number, n: number) =>
      Math.min(n - 1, Math.max(0, Math.floor((v - o) / tileSizeNm)))
    index.tiles.forEach((tile, b) => {
      const batch = table.batches[b]!
      expect(batch.numRows).toBe(tile.rowCount)
      const xs = numbers(batch, 'x')
      const ys = numbers(batch, 'y')
      expect(xs.every((v) => cell(v, originX, columns) === tile.column)).toBe(true)
      expect(ys.every((v) => cell(v, originY, gridRows) === tile.row)).toBe(true)
      expect(Math.min(...xs)).toBe(tile.boundsNm.xMin)
      expect(Math.max(...ys)).toBe(tile.boundsNm.yMax)
    })
    expect(index.tiles.map((t) => t.key)).toEqual(
      [...index.tiles.map((t) => t.key)].sort((a, b) => a - b),
    )
  })
})

/** The two readers of a box: the general one, and the one previews keep per thread. */
const boxReader = new StoreBoxReader()
afterAll(() => boxReader.close())
const readers: [
  string,
  (path: string, box: Parameters<typeof readTilesInBox>[1]) => Promise<BoxRows>,
][] = [
  ['readTilesInBox', (path, box) => readTilesInBox(path, box)],
  ['StoreBoxReader', async (path, box) => (await boxReader.rowsInBox(path, box, () => true))!],
]

describe.each(readers)('%s', (_name, readBox) => {
  /** The reference: every row of the whole table inside the box. */
  function bruteForce(box: { xMin: number; xMax: number; yMin: number; yMax: number }) {
    const [x, y, id] = ['x', 'y', 'id'].map(column)
    return id!.filter(
      (_, i) =>
        x![i]! >= box.xMin && x![i]! <= box.xMax && y![i]! >= box.yMin && y![i]! <= box.yMax,
    )
  }

  it('returns exactly the rows inside boxes of many sizes, reading only the tiles they meet', async () => {
    for (let k = 0; k < 25; k++) {
      const xMin = -3000 + random() * 44_000
      const yMin = -1000 + random() * 32_000
      const side = 100 + random() * 15_000
      const box = { xMin, xMax: xMin + side, yMin, yMax: yMin + side * (0.3 + random()) }
      const found = await readBox(outputPath, box)
      expect(Array.from(found.columns.id!).sort((a, b) => a - b)).toEqual(
        bruteForce(box).sort((a, b) => a - b),
      )
      expect(found.rowCount).toBe(found.columns.x!.length)
      if (side < 3000) expect(found.tilesRead).toBeLessThan(found.tilesTotal / 2)
    }
  })

  it('includes rows on the edges of the box and reads nothing for a box outside', async () => {
    const x = column('x')[0]!
    const y = column('y')[0]!
    const edge = await readBox(outputPath, { xMin: x, xMax: x, yMin: y, yMax: y })
    expect(Array.from(edge.columns.x!)).toContain(x)
    const outside = await readBox(outputPath, { xMin: 1e6, xMax: 2e6, yMin: 0, yMax: 1 })
    expect(outside).toMatchObject({ rowCount: 0, tilesRead: 0 })
  })
})

describe('a table sorted by position', () => {
  it('is regrouped on the bounds of all rows when its first rows cover a corner only', async () => {
    const sorted = Array.from(
      { length: 6000 },
      (_, i) => `${i + 1},${((i * 40_000) / 6000).toFixed(1)},${(random() * 40_000).toFixed(1)}`,
    )
    const sourcePath = tmp.file('sorted.csv', `frame,x_nm,y_nm\n${sorted.join('\n')}\n`)
    const out = tmp.path('sorted.arrow')
    const sortedMapping = {
      frameBase: 1 as const,
      columns: mapping.columns.slice(1, 4).map((c, index) => ({ ...c, index })),
    }
    const tuning = { workers: 0, chunkBytes: 4096, rowsPerTile: 300 }
    const sortedReport = await ingestLocalizationTable({
      sourcePath,
      outputPath: out,
      mapping: sortedMapping,
      tuning,
    })
    const sortedIndex = await readTileIndex(out)
    // 6000 rows at about 300 per tile: the grid spans all of x, no tile holds a large share.
    expect(sortedReport.output.grid.originX).toBe(0)
    expect(Math.max(...sortedIndex.tiles.map((t) => t.rowCount))).toBeLessThan(1000)
    const box = { xMin: 10_000, xMax: 12_000, yMin: 5000, yMax: 9000 }
    const inside = sorted.filter((line) => {
      const [, x, y] = line.split(',').map(Number)
      return (
        Math.fround(x!) >= box.xMin &&
        Math.fround(x!) <= box.xMax &&
        Math.fround(y!) >= box.yMin &&
        Math.fround(y!) <= box.yMax
      )
    })
    expect((await readTilesInBox(out, box)).rowCount).toBe(inside.length)
  })
})
