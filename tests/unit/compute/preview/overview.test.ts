// @vitest-environment node
import sharp from 'sharp'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { renderTilePng, type TileTask } from '@server/compute/preview'
import { pyramidFor, tileView, type TilePyramid } from '@server/compute/render'
import { readTileIndex } from '@server/compute/store'
import { simulatedStore } from '../../../fixtures/simulated-store'
import { tempDir } from '../../ingest/ingest-fixtures'

const tmp = tempDir()
let store = ''
let pyramid: TilePyramid

beforeAll(async () => {
  // Filaments over a 10 µm field, several hundred thousand rows (seeded).
  store = await simulatedStore(tmp, 'field', { seed: 21, frames: 4_000, emitters: 40_000 })
  pyramid = pyramidFor((await readTileIndex(store)).boundsNm!)
}, 120_000)
afterAll(() => tmp.remove())

async function pixels(task: TileTask) {
  return sharp(await renderTilePng(task))
    .raw()
    .toBuffer()
}

describe('coarse tiles from the overview', () => {
  it('are, pixel for pixel, the tiles rendered from the rows, at every coarse level', async () => {
    expect(pyramid.levels).toBeGreaterThan(5)
    const options = { contrast: { mode: 'manual' as const, low: 0, high: 40 }, gamma: 0.8 }
    let compared = 0
    for (let z = 0; z < 4; z++) {
      const { columns, rows } = pyramid.tileCounts[z]!
      for (const [x, y] of [
        [0, 0],
        [columns - 1, rows - 1],
        [Math.floor(columns / 2), Math.floor(rows / 3)],
      ] as const) {
        const view = tileView(pyramid, z, x, y)!
        const base = { arrowPath: store, view, options, marginNm: 0, pyramid }
        const fromRows = await pixels({ ...base, overviewFromRows: Infinity })
        const fromOverview = await pixels({ ...base, overviewFromRows: 0 })
        expect(fromRows.some((v) => v > 0)).toBe(true)
        expect(Buffer.compare(fromOverview, fromRows)).toBe(0)
        compared++
      }
    }
    expect(compared).toBe(12)
  })

  it('draws each tile alike whatever the thread drew before (its buffers are reused)', async () => {
    const options = { contrast: { mode: 'manual' as const, low: 0, high: 40 } }
    const task = (z: number, x: number, y: number) => ({
      arrowPath: store,
      view: tileView(pyramid, z, x, y)!,
      options,
      marginNm: 0,
      pyramid,
      overviewFromRows: Infinity,
    })
    const deep = pyramid.levels - 1
    const first = await renderTilePng(task(deep, 3, 4))
    await renderTilePng(task(2, 1, 1)) // a busy tile in between
    await renderTilePng(task(deep, 0, 0))
    expect(
      Buffer.compare(Buffer.from(await renderTilePng(task(deep, 3, 4))), Buffer.from(first)),
    ).toBe(0)
  })

  it('is not used where it cannot stand in: filters, Gaussian rendering, the overview level itself', async () => {
    const view = tileView(pyramid, 1, 0, 0)!
    const base = { arrowPath: store, view, marginNm: 0, pyramid, overviewFromRows: 0 }
    const filtered = {
      contrast: { mode: 'manual' as const, low: 0, high: 40 },
      filter: { frameMax: 100 },
    }
    const rowsFiltered = await pixels({ ...base, options: filtered, overviewFromRows: Infinity })
    expect(Buffer.compare(await pixels({ ...base, options: filtered }), rowsFiltered)).toBe(0)
    const unfiltered = await pixels({ ...base, options: { contrast: filtered.contrast } })
    expect(Buffer.compare(unfiltered, rowsFiltered)).not.toBe(0)
  })
})
