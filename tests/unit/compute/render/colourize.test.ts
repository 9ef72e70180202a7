import { describe, expect, it } from 'vitest'
import * as chromatic from 'd3-scale-chromatic'
import {
  CHANNEL_COLOURS,
  colormapTable,
  colourize,
  colourizeByValue,
  overlayChannels,
  percentileOfPositive,
  resolveContrast,
} from '../../../../server/compute/render'
import { createRandom } from '../../../fixtures/spot-simulation'

const hex = (table: Uint8Array, k: number) =>
  `#${Array.from(table.subarray(3 * k, 3 * k + 3), (v) => v.toString(16).padStart(2, '0')).join('')}`

describe('colormaps', () => {
  // Published ends of the matplotlib maps (viridis #440154 → #fde725, from memory), confirmed
  // against d3-scale-chromatic 3.1.1's interpolators while writing this test.
  it.each([
    ['viridis', '#440154', '#fde725'],
    ['magma', '#000004', '#fcfdbf'],
    ['inferno', '#000004', '#fcffa4'],
    ['grayscale', '#000000', '#ffffff'],
  ] as const)('%s runs from %s to %s', (name, first, last) => {
    const table = colormapTable(name)
    expect(hex(table, 0)).toBe(first)
    expect(hex(table, 255)).toBe(last)
  })

  it.each([
    ['viridis', chromatic.interpolateViridis],
    ['magma', chromatic.interpolateMagma],
    ['inferno', chromatic.interpolateInferno],
    ['cividis', chromatic.interpolateCividis],
  ] as const)('%s entry k is the package’s colour at k/255', (name, interpolate) => {
    const table = colormapTable(name)
    for (let k = 0; k < 256; k += 17) {
      const colour = interpolate(k / 255)
      const rgb = colour.startsWith('#')
        ? [1, 3, 5].map((at) => parseInt(colour.slice(at, at + 2), 16))
        : colour.slice(4, -1).split(',').map(Number)
      expect(Array.from(table.subarray(3 * k, 3 * k + 3))).toEqual(rgb)
    }
  })
})

describe('auto contrast', () => {
  it('puts the top at the 99.5th percentile of positive pixels: 1…1000 → 995.005', () => {
    // Hyndman & Fan definition 7 (numpy's default): rank 999·0.995 = 994.005, so
    // 995 + 0.005·(996 − 995) = 995.005 (worked by hand); zeros are left out.
    const image = new Float32Array(5000)
    for (let v = 1; v <= 1000; v++) image[v * 3] = v
    const contrast = resolveContrast(image, { mode: 'auto' })
    expect(contrast.low).toBe(0)
    expect(contrast.high).toBeCloseTo(995.005, 3)
  })

  it('matches a sort-based percentile on random and tied images (naive reference)', () => {
    const random = createRandom(31)
    const continuous = Float32Array.from({ length: 40_000 }, () =>
      random() < 0.6 ? 0 : -Math.log(random()) * 3,
    )
    const tied = Float32Array.from({ length: 40_000 }, () =>
      random() < 0.5 ? 0 : random() < 0.98 ? 1 : 50 + Math.floor(random() * 3),
    )
    for (const image of [continuous, tied]) {
      for (const p of [0, 50, 90, 99.5, 100]) {
        const sorted = Array.from(image.filter((v) => v > 0)).sort((a, b) => a - b)
        const rank = ((sorted.length - 1) * p) / 100
        const k = Math.floor(rank)
        const expected = sorted[k]! + (rank - k) * ((sorted[k + 1] ?? sorted[k]!) - sorted[k]!)
        expect(percentileOfPositive(image, p)).toBeCloseTo(expected, 4)
      }
    }
  })

  it('an empty image has no range and says why', () => {
    const contrast = resolveContrast(new Float32Array(16))
    expect(contrast.reason).toMatch(/no positive pixels/)
    expect(Array.from(colourize(new Float32Array(4), { colormap: 'grayscale' }))).toEqual(
      new Array(12).fill(0),
    )
  })
})

describe('colouring', () => {
  const manual = { mode: 'manual', low: 0, high: 10 } as const

  it('maps low → first entry and high → last, linearly between, gamma after contrast', () => {
    const image = Float32Array.from([0, 5, 10, 20, 2.5, NaN])
    const grey = colourize(image, { colormap: 'grayscale', contrast: manual })
    // 5/10 · 255 = 127.5 → 128 (round half up); 2.5 → 63.75 → 64.
    expect(Array.from(grey.filter((_, i) => i % 3 === 0))).toEqual([0, 128, 255, 255, 64, 0])
    const lifted = colourize(image, { colormap: 'grayscale', contrast: manual, gamma: 0.5 })
    expect(lifted[3 * 4]).toBe(128) // √0.25 = 0.5
  })

  it('gives empty pixels the colour of 0 even when the range starts below 0, into a lent buffer too', () => {
    // low −10, high 10: 0 sits mid-range, 5/20 · 255 → 128 for 0 and 191 for 5 (linear map).
    const image = Float32Array.from([0, 5, -10, 0])
    const below = { mode: 'manual', low: -10, high: 10 } as const
    const grey = colourize(image, { colormap: 'grayscale', contrast: below })
    expect(Array.from(grey.filter((_, i) => i % 3 === 0))).toEqual([128, 191, 0, 128])
    const lent = new Uint8Array(12).fill(7)
    const into = colourize(image, { colormap: 'grayscale', contrast: below }, lent)
    expect(into).toBe(lent)
    expect(Array.from(into)).toEqual(Array.from(grey))
  })

  it('colour by value: hue from the mean, brightness from the density', () => {
    const density = Float32Array.from([10, 5, 10, 0])
    const mean = Float32Array.from([0, 100, 100, 50])
    const rgb = colourizeByValue(density, mean, {
      colormap: 'viridis',
      contrast: manual,
      valueRange: { min: 0, max: 100 },
    })
    const viridis = colormapTable('viridis')
    expect(Array.from(rgb.subarray(0, 3))).toEqual(Array.from(viridis.subarray(0, 3)))
    expect(Array.from(rgb.subarray(6, 9))).toEqual(Array.from(viridis.subarray(765, 768)))
    const half = Array.from(viridis.subarray(765, 768), (v) => Math.round((v * 128) / 255))
    expect(Array.from(rgb.subarray(3, 6))).toEqual(half)
    expect(Array.from(rgb.subarray(9, 12))).toEqual([0, 0, 0])
  })

  it('two channels add up and clamp: full amber + full azure = white', () => {
    const a = Float32Array.from([10, 0, 10, 5])
    const b = Float32Array.from([0, 10, 10, 0])
    const rgb = overlayChannels(a, b, { contrast: manual })
    expect(Array.from(rgb.subarray(0, 3))).toEqual(CHANNEL_COLOURS[0])
    expect(Array.from(rgb.subarray(3, 6))).toEqual(CHANNEL_COLOURS[1])
    expect(Array.from(rgb.subarray(6, 9))).toEqual([255, 255, 255])
    expect(Array.from(rgb.subarray(9, 12))).toEqual([128, 64, 0])
  })
})
