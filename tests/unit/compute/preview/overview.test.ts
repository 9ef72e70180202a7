// @vitest-environment node
import { join } from 'node:path'
import sharp from 'sharp'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { sharedOverview, type TileTask } from '@server/compute/preview'
import { pyramidFor, tileView, type TilePyramid } from '@server/compute/render'
import { readTileIndex } from '@server/compute/store'
import { TilePool } from '@server/modules/preview/tile-pool'
import { simulatedStore, tilePng } from '../../../fixtures/simulated-store'
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
  return sharp(await tilePng(task))
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
    const first = await tilePng(task(deep, 3, 4))
    await tilePng(task(2, 1, 1)) // a busy tile in between
    await tilePng(task(deep, 0, 0))
    expect(Buffer.compare(Buffer.from(await tilePng(task(deep, 3, 4))), Buffer.from(first))).toBe(0)
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

describe('one overview for every tile thread', () => {
  const coarse = [
    [0, 0, 0],
    [1, 1, 0],
    [2, 1, 2],
    [3, 4, 3],
  ] as const
  const options = { contrast: { mode: 'manual' as const, low: 0, high: 40 } }

  it('draws, from memory every thread can read, the tiles the rows draw', async () => {
    const overview = await sharedOverview(store, pyramid)
    expect(overview.counts.buffer).toBeInstanceOf(SharedArrayBuffer)
    for (const [z, x, y] of coarse) {
      const base = { arrowPath: store, view: tileView(pyramid, z, x, y)!, options, marginNm: 0 }
      const fromRows = await pixels({ ...base, pyramid, overviewFromRows: Infinity })
      const given = await pixels({ ...base, pyramid, overviewFromRows: 0, overview })
      expect(fromRows.some((v) => v > 0)).toBe(true)
      expect(Buffer.compare(given, fromRows)).toBe(0)
      // And it is the overview given that is drawn: doubled counts draw another tile.
      const doubled = { view: overview.view, counts: overview.counts.map((v) => 2 * v) }
      const drawnDoubled = await pixels({
        ...base,
        pyramid,
        overviewFromRows: 0,
        overview: doubled,
      })
      expect(Buffer.compare(drawnDoubled, fromRows)).not.toBe(0)
    }
  })

  it('is computed by one thread of the pool and shared with the others, not copied', async () => {
    const pool = new TilePool()
    try {
      // Posted back from its thread as a SharedArrayBuffer: shared memory (a copy would arrive as
      // an ArrayBuffer), and shared again with each tile posted below.
      const overview = await pool.overview({ arrowPath: store, pyramid })
      expect(overview.counts.buffer).toBeInstanceOf(SharedArrayBuffer)
      // Both threads draw with it at once; the tiles are those the rows draw.
      const drawn = await Promise.all(
        coarse.map(([z, x, y]) =>
          pool.tile({
            cachePath: join(tmp.dir, 'tiles', `${z}-${x}-${y}.png`),
            arrowPath: store,
            view: tileView(pyramid, z, x, y)!,
            options,
            marginNm: 0,
            pyramid,
            overviewFromRows: 0,
            overview,
          }),
        ),
      )
      for (const [i, [z, x, y]] of coarse.entries()) {
        const view = tileView(pyramid, z, x, y)!
        const base = { arrowPath: store, view, options, marginNm: 0, pyramid }
        const fromRows = await pixels({ ...base, overviewFromRows: Infinity })
        expect(Buffer.compare(await sharp(drawn[i]!).raw().toBuffer(), fromRows)).toBe(0)
      }
    } finally {
      await pool.close()
    }
  }, 60_000)
})
