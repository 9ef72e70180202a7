// @vitest-environment node
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import {
  MeasurementRefusedError,
  RegionMeasurer,
  regionShape,
  ripley,
  selectLocalizations,
} from '@server/compute/regions'
import { readLocalizations } from '@server/compute/store'
import { tempDir } from '../../ingest/ingest-fixtures'
import { simulatedStore } from '../../../fixtures/simulated-store'
import { rectangle } from './point-sets'

const dir = tempDir()
let store = ''
const measurer = new RegionMeasurer()

beforeAll(async () => {
  // About 150 000 rows of clustered localizations over 10 µm: several store tiles.
  store = await simulatedStore(dir, 'clusters', {
    seed: 4,
    structure: { kind: 'clusters', count: 300, radiusNm: 40 },
    emitters: 25_000,
    frames: 2_000,
  })
}, 120_000)
afterAll(async () => {
  await measurer.close()
  dir.remove()
})

const triangle = {
  type: 'Polygon' as const,
  coordinates: [
    [
      [2000, 2000],
      [6000, 2500],
      [3000, 5000],
      [2000, 2000],
    ] as [number, number][],
  ],
}

describe('localizations inside a region, from the store', () => {
  it('are exactly those the shape contains, read from the tiles the region meets only', async () => {
    const shape = regionShape(triangle)
    const all = await readLocalizations(store)
    let expected = 0
    for (let i = 0; i < all.count; i++) if (shape.contains(all.x[i]!, all.y[i]!)) expected++
    const picked = await selectLocalizations(store, shape)
    expect(picked.count).toBe(expected)
    expect(expected).toBeGreaterThan(1000)
    expect(picked.tilesRead).toBeLessThan(picked.tilesTotal)
    expect(picked.precision).not.toBeNull()
  })

  it('refuses a region over the localization limit before reading it, naming the limit', async () => {
    await expect(
      selectLocalizations(store, regionShape(rectangle(0, 0, 10_000, 10_000)), 1000),
    ).rejects.toThrow(/measurements take at most 1,000/)
  })
})

describe('measurements in threads', { timeout: 120_000 }, () => {
  it('summary: count, area, density and mean precision', async () => {
    const result = await measurer.measure(store, triangle, { kind: 'summary', pointRadius: 250 })
    const picked = await selectLocalizations(store, regionShape(triangle))
    expect(result).toMatchObject({ kind: 'summary', count: picked.count, areaNm2: 5_750_000 })
    if (result.kind !== 'summary') throw new Error('wrong kind')
    expect(result.densityPerUm2).toBeCloseTo(picked.count / 5.75, 6)
    expect(result.meanPrecisionNm).toBeGreaterThan(1)
  })

  it('Ripley split over two threads gives the one-thread envelope exactly', async () => {
    const query = {
      kind: 'ripley' as const,
      pointRadius: 250,
      rMax: 300,
      steps: 10,
      simulations: 9,
      seed: 7,
      correction: 'translation' as const,
    }
    const split = await measurer.measure(store, triangle, query)
    const shape = regionShape(triangle)
    const points = await selectLocalizations(store, shape)
    const single = ripley(points.x, points.y, points.count, shape, query)
    if (split.kind !== 'ripley') throw new Error('wrong kind')
    // Equal up to rounding: simulations pair up differently for one FFT between the two runs.
    const same = (a: number[], b: number[]) => a.forEach((v, j) => expect(v).toBeCloseTo(b[j]!, 9))
    same(split.L, single.L)
    same(split.envelope!.low, single.envelope!.low)
    same(split.envelope!.high, single.envelope!.high)
  })

  it('refusals come back as MeasurementRefusedError with the reason', async () => {
    const bowtie = {
      type: 'Polygon' as const,
      coordinates: [
        [
          [0, 0],
          [1000, 1000],
          [1000, 0],
          [0, 1000],
          [0, 0],
        ] as [number, number][],
      ],
    }
    await expect(
      measurer.measure(store, bowtie, { kind: 'summary', pointRadius: 250 }),
    ).rejects.toMatchObject({
      reason: 'shape',
      message: expect.stringMatching(/crosses itself/),
    })
    const refused = measurer.measure(store, triangle, {
      kind: 'dbscan',
      pointRadius: 250,
      eps: 1000,
      minPts: 5,
    })
    await expect(refused).rejects.toBeInstanceOf(MeasurementRefusedError)
    await expect(refused).rejects.toMatchObject({
      reason: 'limit',
      message: expect.stringMatching(/Use a smaller eps/),
    })
  })
})
