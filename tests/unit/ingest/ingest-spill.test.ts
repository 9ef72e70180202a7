// @vitest-environment node
/**
 * Past its memory budget the ingest spills parsed chunks to disk (chunk.spill.ts) so that very
 * large tables convert in bounded memory. The reference is the same ingest held in memory: the
 * store it writes must be byte for byte the same, whatever was spilled, and no spill file may
 * outlive the ingest.
 */
import { existsSync, readdirSync, readFileSync } from 'node:fs'
import { basename } from 'node:path'
import { afterAll, describe, expect, it } from 'vitest'
import { ingestLocalizationTable, type IngestOptions } from '@server/compute/ingest'
import { FXYP, seeded, tempDir } from './ingest-fixtures'

const tmp = tempDir()
afterAll(() => tmp.remove())
let n = 0

/** Rows in frame order over a 20 × 20 µm field; a channel (0/1, stored as Uint8). */
function frameOrderedTable(rows: number, seed: number, firstFrame = 1) {
  const random = seeded(seed)
  const lines = ['frame,x,y,photons,channel']
  for (let i = 0; i < rows; i++) {
    const frame = firstFrame + Math.floor(i / 50)
    const x = (random() * 20_000).toFixed(2)
    const y = (random() * 20_000).toFixed(2)
    lines.push(`${frame},${x},${y},${(200 + random() * 3000).toFixed(1)},${i % 2}`)
  }
  return `${lines.join('\n')}\n`
}

const MAPPING = {
  ...FXYP,
  frameBase: 'auto' as const,
  columns: [...FXYP.columns, { index: 4, role: 'channel' as const }],
}

async function ingestBoth(text: string, tuning: NonNullable<IngestOptions['tuning']>) {
  const sourcePath = tmp.file(`spill-in${n}.csv`, text)
  const run = async (memoryBudgetBytes?: number) => {
    const outputPath = tmp.path(`spill-out${n++}.arrow`)
    const report = await ingestLocalizationTable({
      sourcePath,
      outputPath,
      mapping: MAPPING,
      tuning: { ...tuning, memoryBudgetBytes },
    })
    return { report, outputPath }
  }
  const both = { held: await run(), spilled: await run(64 << 10) }
  expect(both.held.report.output.spilledBytes).toBe(0)
  // Most of the parsed bytes went through the spill file (all but the first 64 KiB or so).
  const parsed = both.held.report.output.bytes
  expect(both.spilled.report.output.spilledBytes).toBeGreaterThan(parsed / 2)
  return both
}

function expectSameStore(a: string, b: string) {
  expect(readFileSync(b).equals(readFileSync(a))).toBe(true)
  // The index names its Arrow file; everything else must match.
  const index = readFileSync(`${b}.index.json`, 'utf8').replaceAll(basename(b), basename(a))
  expect(index).toBe(readFileSync(`${a}.index.json`, 'utf8'))
}

const spillFilesLeft = () => readdirSync(tmp.dir).filter((f) => f.endsWith('.spill'))

describe('ingest past its memory budget', () => {
  it('writes the same store from spilled chunks as from chunks held in memory', async () => {
    const text = frameOrderedTable(60_000, 11)
    const { held, spilled } = await ingestBoth(text, { workers: 2, chunkBytes: 64 << 10 })
    expect(held.report.rowsAccepted).toBe(60_000)
    expectSameStore(held.outputPath, spilled.outputPath)
    expect(spillFilesLeft()).toEqual([])
  })

  it('shifts the frames of a 1-based table read back from the spill file', async () => {
    // Frames start at 1 and 'auto' settles the base from the whole column: every frame − 1.
    const text = frameOrderedTable(20_000, 12, 1)
    const { held, spilled } = await ingestBoth(text, { workers: 0, chunkBytes: 32 << 10 })
    expect(held.report.columns.find((c) => c.name === 'frame')?.min).toBe(0)
    expectSameStore(held.outputPath, spilled.outputPath)
  })

  it('regroups spilled chunks when the first rows did not span the field', async () => {
    // Sorted by x: the first chunk covers a thin strip, so the grid is laid again over all rows.
    const rows = frameOrderedTable(30_000, 13).trim().split('\n')
    const body = rows.slice(1).sort((a, b) => Number(a.split(',')[1]) - Number(b.split(',')[1]))
    const text = `${rows[0]}\n${body.join('\n')}\n`
    const { held, spilled } = await ingestBoth(text, { workers: 2, chunkBytes: 48 << 10 })
    expectSameStore(held.outputPath, spilled.outputPath)
  })

  it('removes the spill file when the ingest fails part way', async () => {
    const text = frameOrderedTable(20_000, 14)
    const sourcePath = tmp.file('spill-fail.csv', text)
    const outputPath = tmp.path('spill-fail.arrow')
    const failing = ingestLocalizationTable({
      sourcePath,
      outputPath,
      mapping: MAPPING,
      limits: { maxRows: 15_000 },
      tuning: { workers: 2, chunkBytes: 16 << 10, memoryBudgetBytes: 16 << 10 },
    })
    await expect(failing).rejects.toMatchObject({ code: 'too_many_rows' })
    expect(existsSync(`${outputPath}.spill`)).toBe(false)
    expect(spillFilesLeft()).toEqual([])
  })
})
