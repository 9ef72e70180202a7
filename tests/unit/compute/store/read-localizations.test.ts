// @vitest-environment node
import { readFileSync, writeFileSync } from 'node:fs'
import {
  Field,
  Float32,
  makeVector,
  Schema,
  Table,
  tableFromIPC,
  tableToIPC,
  vectorFromArray,
} from 'apache-arrow'
import { afterAll, describe, expect, it } from 'vitest'
import { suggestMapping } from '@shared/domain/localization-columns'
import { ingestLocalizationTable, sniffTable } from '@server/compute/ingest'
import { simulateLocalizations } from '@server/compute/simulate'
import { localizationsToCsv } from '@server/compute/simulate/table-text'
import { readLocalizations, readTileIndex } from '@server/compute/store'
import { readStoreColumns } from '@server/compute/store/column-reader'
import { tempDir } from '../../ingest/ingest-fixtures'

const tmp = tempDir()
afterAll(() => tmp.remove())

/** A simulated table, deposited as text and ingested into a store of many small tiles. */
async function ingestedStore() {
  const { localizations } = simulateLocalizations({ seed: 11, frames: 2_000, emitters: 1_500 })
  const source = tmp.file('table.csv', localizationsToCsv(localizations))
  const sniff = await sniffTable(source)
  const suggestion = suggestMapping(sniff.header, sniff.sampleRows)
  const outputPath = tmp.path('table.arrow')
  await ingestLocalizationTable({
    sourcePath: source,
    outputPath,
    mapping: {
      frameBase: suggestion.frameBase,
      columns: suggestion.columns.map(({ index, role, unit }) => ({
        index,
        role,
        ...(unit ? { unit } : {}),
      })),
    },
    tuning: { workers: 0, rowsPerTile: 500 },
  })
  return outputPath
}

/** The same store's columns by role, as apache-arrow's own table reader concatenates them. */
function columnsByLibrary(path: string) {
  const table = tableFromIPC(readFileSync(path))
  return new Map(
    table.schema.fields.map((f) => [f.metadata.get('role'), table.getChild(f.name)!.toArray()]),
  )
}

describe('readLocalizations — straight from the store file into one array per column', () => {
  it('gives, column by column, what apache-arrow reads from the same file', async () => {
    const path = await ingestedStore()
    const index = await readTileIndex(path)
    expect(index.tiles.length).toBeGreaterThan(20)
    const expected = columnsByLibrary(path)
    const direct = await readStoreColumns(path, () => true)
    expect(direct?.columns.size).toBe(expected.size)
    const locs = await readLocalizations(path)
    expect(locs.count).toBe(index.rowCount)
    for (const role of [
      'x',
      'y',
      'frame',
      'photons',
      'background',
      'sigma',
      'uncertainty',
    ] as const) {
      const column = locs[role]!
      expect(column.constructor).toBe(expected.get(role)!.constructor)
      expect(Array.from(column)).toEqual(Array.from(expected.get(role)!))
    }
  })

  it('reads an Arrow file another writer made, with nulls, through the general path', async () => {
    const xs = Float32Array.from({ length: 300 }, (_, i) => i * 1.5)
    const field = (name: string, role: string) =>
      new Field(name, new Float32(), true, new Map([['role', role]]))
    const schema = new Schema([field('x', 'x'), field('y', 'y'), field('photons', 'photons')])
    const table = new Table(schema, {
      x: makeVector(xs),
      y: makeVector(xs.map((v) => v * 2)),
      photons: vectorFromArray(
        Array.from(xs, (v, i) => (i % 7 === 0 ? null : v)),
        new Float32(),
      ),
    })
    const path = tmp.path('foreign.arrow')
    writeFileSync(path, tableToIPC(table, 'file'))
    expect(await readStoreColumns(path, () => true)).toBeNull()
    const locs = await readLocalizations(path)
    expect(locs.count).toBe(300)
    expect(Array.from(locs.y.subarray(0, 3))).toEqual([0, 3, 6])
    expect(locs.photons!.length).toBe(300)
    expect(Array.from(locs.frame.subarray(0, 3))).toEqual([0, 0, 0])
  })
})
