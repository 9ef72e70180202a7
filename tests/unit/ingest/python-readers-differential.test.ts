// @vitest-environment node
/**
 * The same table read by the ingest and by the readers people would check it with, pandas
 * read_csv and pyarrow csv.read_csv, column by column: every stored value within float32 rounding
 * of theirs (half an ulp of float32, |v|·2⁻²⁴, after the unit conversion), frames exact. pandas
 * is required (CI installs Debian's python3-pandas; the test skips, and says so, only where it is
 * absent); pyarrow is compared too where it is installed (Debian does not package it).
 */
import { execFileSync } from 'node:child_process'
import { readFileSync } from 'node:fs'
import { tableFromIPC } from 'apache-arrow'
import { afterAll, describe, expect, it } from 'vitest'
import { ingestLocalizationTable } from '@server/compute/ingest'
import { numbers, seeded, tempDir } from './ingest-fixtures'

const tmp = tempDir()
afterAll(() => tmp.remove())

const READ = `
import json, sys
import pandas as pd
path = sys.argv[1]
cols = ['id', 'frame', 'x_um', 'y_px', 'photons']
p = pd.read_csv(path)
out = {'pandas': {c: p[c].tolist() for c in cols}}
try:
    from pyarrow import csv
except ImportError:
    pass
else:
    a = csv.read_csv(path).to_pandas()
    out['pyarrow'] = {c: a[c].tolist() for c in cols}
print(json.dumps(out))
`

function pythonReaders(): string | null {
  try {
    execFileSync('python3', ['-c', 'import pandas'], { stdio: 'ignore' })
    return null
  } catch {
    return 'python3 with pandas is not installed here'
  }
}
const missing = pythonReaders()
const PIXEL_NM = 106.7

/** 20 000 rows in decimal spellings a fitter writes, ids in shuffled order. */
function table(): string {
  const random = seeded(13)
  const lines = ['id,frame,x_um,y_px,photons']
  for (let i = 0; i < 20_000; i++) {
    const x = (random() * 40).toFixed(1 + (i % 6))
    const y = (random() * 400).toPrecision(3 + (i % 7))
    const photons = i % 5 === 0 ? (random() * 1e4).toExponential(4) : (random() * 5e3).toFixed(2)
    lines.push(`${(i * 7919) % 20_000},${Math.floor(i / 3)},${x},${y},${photons}`)
  }
  return lines.join('\n') + '\n'
}

describe('ingest against pandas and pyarrow', () => {
  it.skipIf(missing !== null)(
    `stores what they read, within float32 rounding${missing ? ` (skipped: ${missing})` : ''}`,
    async () => {
      const sourcePath = tmp.file('readers.csv', table())
      const outputPath = tmp.path('readers.arrow')
      await ingestLocalizationTable({
        sourcePath,
        outputPath,
        mapping: {
          frameBase: 0,
          pixelSizeNm: PIXEL_NM,
          columns: [
            { index: 0, role: 'other' },
            { index: 1, role: 'frame' },
            { index: 2, role: 'x', unit: 'um' },
            { index: 3, role: 'y', unit: 'px' },
            { index: 4, role: 'photons', unit: 'photons' },
          ],
        },
      })
      const stored = tableFromIPC(readFileSync(outputPath))
      const ids = numbers(stored, 'id')
      const order = ids.map((id, row) => [id, row] as const).sort((a, b) => a[0] - b[0])
      const column = (name: string) => {
        const values = numbers(stored, name)
        return order.map(([, row]) => values[row]!)
      }
      const ours = {
        frame: column('frame'),
        x: column('x'),
        y: column('y'),
        photons: column('photons'),
      }
      const out = execFileSync('python3', ['-c', READ, sourcePath], { maxBuffer: 64 << 20 })
      const theirs = JSON.parse(String(out)) as Record<string, Record<string, number[]>>
      expect(Object.keys(theirs)).toContain('pandas')
      for (const [reader, cols] of Object.entries(theirs)) {
        const byId = cols.id!.map((id, row) => [id, row] as const).sort((a, b) => a[0] - b[0])
        const pick = (name: string, scale = 1) => byId.map(([, row]) => cols[name]![row]! * scale)
        expect(pick('frame'), reader).toEqual(ours.frame)
        const worst = (mine: number[], ref: number[]) =>
          Math.max(...ref.map((v, i) => Math.abs(mine[i]! - v) / (Math.abs(v) * 2 ** -24 || 1)))
        // Ratio of |Δ| to half a float32 ulp (|v|·2⁻²⁴): at most 1 when rounding is correct.
        expect(worst(ours.x, pick('x_um', 1000)), `${reader} x`).toBeLessThanOrEqual(1.0001)
        expect(worst(ours.y, pick('y_px', PIXEL_NM)), `${reader} y`).toBeLessThanOrEqual(1.0001)
        expect(worst(ours.photons, pick('photons')), `${reader} photons`).toBeLessThanOrEqual(
          1.0001,
        )
      }
    },
    60_000,
  )
})
