// @vitest-environment node
/**
 * A tile drawn by the tile path (rows fetched from the store's spatial index, only the columns
 * the options draw with, buffers reused) against the same view drawn by renderImage from the
 * whole table read independently: the same pixels for every kind of option that reads a column
 * beyond x and y.
 */
import sharp from 'sharp'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Localizations } from '@server/compute/localizations.types'
import {
  columnsDrawn,
  pyramidFor,
  renderImage,
  tileView,
  type RenderOptions,
  type TilePyramid,
} from '@server/compute/render'
import { readLocalizations, readTileIndex } from '@server/compute/store'
import { simulatedStore, tilePng } from '../../../fixtures/simulated-store'
import { tempDir } from '../../ingest/ingest-fixtures'

const tmp = tempDir()
let store = ''
let pyramid: TilePyramid
let table: Localizations

beforeAll(async () => {
  // Two channels in 3D over 6 µm (seeded), so every column a render can read is there.
  store = await simulatedStore(tmp, 'two-colour-3d', {
    seed: 8,
    fieldNm: 6000,
    frames: 2000,
    channels: [
      { structure: { kind: 'rings' }, emitters: 4000 },
      { structure: { kind: 'clusters' }, emitters: 4000 },
    ],
    axial: { rangeNm: [-300, 300] },
  })
  pyramid = pyramidFor((await readTileIndex(store)).boundsNm!)
  table = await readLocalizations(store)
}, 120_000)
afterAll(() => tmp.remove())

const manual = { mode: 'manual' as const, low: 0, high: 6 }
const cases: [string, RenderOptions][] = [
  ['plain density', { contrast: manual }],
  ['a frame range', { contrast: manual, filter: { frameMin: 200, frameMax: 900 } }],
  ['a precision filter', { contrast: manual, filter: { maxUncertaintyNm: 8 } }],
  ['one channel', { contrast: manual, filter: { channel: 1 } }],
  ['colour by frame', { contrast: manual, colourBy: 'frame', valueRange: { min: 0, max: 2000 } }],
  ['colour by z', { contrast: manual, colourBy: 'z', valueRange: { min: -300, max: 300 } }],
  ['channels overlaid', { contrast: manual, colourBy: 'channels' }],
  ['Gaussian, each row its own precision', { contrast: manual, method: 'gaussian' }],
]

describe('a tile drawn from the spatial index', () => {
  it('fetches positions only for a plain density render', () => {
    expect([...columnsDrawn({})]).toEqual([])
    expect([...columnsDrawn({ method: 'gaussian', colourBy: 'z' })].sort()).toEqual([
      'uncertainty',
      'z',
    ])
  })

  it.each(cases)(
    'with %s has the pixels of the whole table drawn in its view',
    async (_, options) => {
      expect(table.channel && table.z && table.uncertainty).toBeTruthy()
      const z = pyramid.levels - 3
      const { columns, rows } = pyramid.tileCounts[z]!
      const view = tileView(pyramid, z, Math.floor(columns / 2), Math.floor(rows / 2))!
      // Gaussian kernels reach 3 σ of at most 32 px: rows that far outside still draw into the view.
      const marginNm = options.method === 'gaussian' ? 96 * view.pixelNm : 0
      const png = await tilePng({ arrowPath: store, view, options, marginNm, pyramid })
      const tile = await sharp(png).raw().toBuffer()
      const whole = renderImage(table, view, options)
      expect(whole.rgb.some((v, i) => v !== whole.rgb[i % 3])).toBe(true) // something is drawn
      expect(Buffer.compare(tile, Buffer.from(whole.rgb))).toBe(0)
    },
  )
})
