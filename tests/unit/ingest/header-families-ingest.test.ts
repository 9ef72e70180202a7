// @vitest-environment node
/**
 * One small table per header spelling family, from its text to the stored columns: sniffed, the
 * mapping suggested from its header (plus the pixel size where the depositor would give it),
 * ingested, and read back from the Arrow file.
 */
import { existsSync, readFileSync } from 'node:fs'
import { tableFromIPC } from 'apache-arrow'
import { afterAll, describe, expect, it } from 'vitest'
import { suggestMapping } from '@shared/domain/localization-columns'
import { columnMappingSchema } from '@shared/schemas/localization-mapping.schema'
import { ingestLocalizationTable, sniffTable } from '@server/compute/ingest'
import { numbers, tempDir } from './ingest-fixtures'

const tmp = tempDir()
afterAll(() => tmp.remove())
let n = 0

async function ingestAsSuggested(text: string, pixelSizeNm?: number, workers?: number) {
  const sourcePath = tmp.file(`family${n}.csv`, text)
  const outputPath = tmp.path(`family${n++}.arrow`)
  const sniff = await sniffTable(sourcePath)
  const suggestion = suggestMapping(sniff.header, sniff.sampleRows)
  const mapping = columnMappingSchema.parse({
    columns: suggestion.columns.map(({ index, role, unit }) =>
      unit ? { index, role, unit } : { index, role },
    ),
    frameBase: suggestion.frameBase,
    ...(pixelSizeNm ? { pixelSizeNm } : {}),
  })
  const tuning = workers ? { workers, chunkBytes: 64 << 10 } : undefined
  const report = await ingestLocalizationTable({ sourcePath, outputPath, mapping, tuning })
  const table = tableFromIPC(readFileSync(outputPath))
  const field = (name: string) => table.schema.fields.find((f) => f.name === name)
  return { suggestion, report, column: (name: string) => numbers(table, name), field }
}

const lines = (...rows: string[]) => rows.join('\n') + '\n'

describe('ingest by header family', () => {
  it('units glued to the name (xnm, ynm, znm) are nm', async () => {
    const { column, suggestion } = await ingestAsSuggested(
      lines('frame,xnm,ynm,znm', '1,100.5,200.25,-300', '2,110,210,40'),
    )
    expect(suggestion.confident).toBe(true)
    expect(column('x')).toEqual([100.5, 110])
    expect(column('y')).toEqual([200.25, 210])
    expect(column('z')).toEqual([-300, 40])
  })

  it('x and y in pixels, z without unit: x × pixel size, z kept in nm', async () => {
    // 10.5 px × 100 nm = 1050 nm; z −250 stays −250 nm (not −25 000).
    const { column } = await ingestAsSuggested(
      lines('frame,x_px,y_px,z', '1,10.5,20.25,-250', '2,11,21,125'),
      100,
    )
    expect(column('x')).toEqual([1050, 1100])
    expect(column('y')).toEqual([2025, 2100])
    expect(column('z')).toEqual([-250, 125])
  })

  it('spelled-out photons and first-frame names; frame base from the whole column', async () => {
    // 0-based: frame 0 appears only on the 30th row, past any first-rows sample.
    const rows = Array.from(
      { length: 40 },
      (_, i) => `${i === 29 ? 0 : 5 + i},${i},${i},${900 + i}`,
    )
    const { column, report } = await ingestAsSuggested(
      lines('first frame,x [nm],y [nm],number of photons', ...rows),
    )
    expect(report.frames).toEqual({ first: 0, last: 44, sourceBase: 0 })
    expect(column('frame').slice(0, 3)).toEqual([5, 6, 7])
    expect(column('photons').slice(0, 2)).toEqual([900, 901])
  })

  it('a 1-based frame column (frame_ix) counts from 0 once stored', async () => {
    const { column, report } = await ingestAsSuggested(
      lines('frame_ix,x [nm],y [nm],n_phot', '1,1,2,500', '2,3,4,600', '7,5,6,700'),
    )
    expect(column('frame')).toEqual([0, 1, 6])
    expect(report.frames).toEqual({ first: 0, last: 6, sourceBase: 1 })
    expect(column('photons')).toEqual([500, 600, 700])
  })

  it('settles the frame base over chunks parsed on worker threads', async () => {
    const rows = Array.from({ length: 30_000 }, (_, i) => `${1 + (i >> 2)},${i % 997},${i % 991}`)
    const { column, report } = await ingestAsSuggested(lines('frame,x_nm,y_nm', ...rows), 0, 2)
    const frames = column('frame')
    expect(report.frames).toEqual({ first: 0, last: 7499, sourceBase: 1 })
    expect(Math.min(...frames)).toBe(0)
    expect(frames.reduce((a, b) => a + b, 0)).toBe(4 * ((7499 * 7500) / 2))
  })

  it('a bare t of whole numbers is the frame', async () => {
    const { column, suggestion } = await ingestAsSuggested(
      lines('t,x [nm],y [nm]', '0,1,2', '3,4,5'),
    )
    expect(suggestion.confident).toBe(true)
    expect(column('frame')).toEqual([0, 3])
  })

  it('precision names: locprecnm and precision_x', async () => {
    const { column, report } = await ingestAsSuggested(
      lines('frame,x [nm],y [nm],locprecnm,precision_x', '1,1,2,8.5,9', '2,3,4,12,13'),
    )
    expect(column('uncertainty')).toEqual([8.5, 12])
    expect(column('uncertaintyX')).toEqual([9, 13])
    expect(report.columns.find((c) => c.role === 'uncertainty')?.unit).toBe('nm')
  })

  it('background: offset in photons is the fitted level, bkgstd its own column', async () => {
    const { column, report } = await ingestAsSuggested(
      lines('frame,x [nm],y [nm],offset [photon],bkgstd', '1,1,2,12.5,3.5', '2,3,4,20,4.5'),
    )
    expect(column('background')).toEqual([12.5, 20])
    expect(column('backgroundSd')).toEqual([3.5, 4.5])
    expect(report.columns.find((c) => c.role === 'backgroundSd')?.unit).toBe('photons')
  })

  it('widths: sigma1/sigma2 are sigma x/y; a FWHM is stored as sigma', async () => {
    const { column, field, report } = await ingestAsSuggested(
      lines('frame,x [nm],y [nm],sigma1,sigma2,fwhm [nm]', '1,1,2,120,130,282.5'),
    )
    expect(column('sigmaX')).toEqual([120])
    expect(column('sigmaY')).toEqual([130])
    // FWHM = 2√(2 ln 2)·σ ≈ 2.3548 σ (DOMAIN.md 1.2): 282.5 nm → 119.97 nm.
    expect(column('sigma')[0]).toBeCloseTo(282.5 / 2.35482, 2)
    expect(field('sigma')?.metadata.get('source_role')).toBe('fwhm')
    expect(report.problems.join(' ')).toContain('is a FWHM and is stored as')
  })

  it('a drift-corrected x (xc) is stored as x, the raw x kept as another column', async () => {
    const { column } = await ingestAsSuggested(
      lines('frame,x [nm],y [nm],xc [nm]', '1,100,200,98.5', '2,110,210,107.5'),
    )
    expect(column('x')).toEqual([98.5, 107.5])
    expect(column('x_nm')).toEqual([100, 110])
  })
})

describe('bad input: refused before anything is written', () => {
  const rows = Array.from({ length: 2000 }, (_, i) => `${i},${i},${i}`)
  const text = lines('frame,x_nm,y_nm', ...rows)

  it('a table past the row limit stops with a rejection in words and leaves no store', async () => {
    const sourcePath = tmp.file('limit.csv', text)
    const outputPath = tmp.path('limit.arrow')
    const mapping = {
      frameBase: 'auto' as const,
      columns: [
        { index: 0, role: 'frame' as const },
        { index: 1, role: 'x' as const, unit: 'nm' as const },
        { index: 2, role: 'y' as const, unit: 'nm' as const },
      ],
    }
    const run = ingestLocalizationTable({
      sourcePath,
      outputPath,
      mapping,
      limits: { maxRows: 100 },
      tuning: { workers: 2, chunkBytes: 4096 },
    })
    await expect(run).rejects.toThrow(/more than 100 rows/)
    expect(existsSync(outputPath)).toBe(false)
    expect(existsSync(`${outputPath}.index.json`)).toBe(false)
  })

  it('a mapping with a PSF width twice (sigma and FWHM) is refused, nothing written', async () => {
    const sourcePath = tmp.file('widths.csv', lines('x_nm,y_nm,sigma,fwhm', '1,2,120,280'))
    const outputPath = tmp.path('widths.arrow')
    const run = ingestLocalizationTable({
      sourcePath,
      outputPath,
      mapping: {
        frameBase: 'auto',
        columns: [
          { index: 0, role: 'x', unit: 'nm' },
          { index: 1, role: 'y', unit: 'nm' },
          { index: 2, role: 'sigma', unit: 'nm' },
          { index: 3, role: 'fwhm', unit: 'nm' },
        ],
      },
    })
    await expect(run).rejects.toThrow(/PSF width once/)
    expect(existsSync(outputPath)).toBe(false)
  })
})
