import { describe, expect, it } from 'vitest'
import {
  renderImage,
  renderOptionsKey,
  resolveRenderOptions,
  type RenderView,
} from '../../../../server/compute/render'
import { tableOf } from './render-fixtures'

describe('render options key', () => {
  it('is the same for the defaults written out and left out, in any key order', () => {
    const written = renderOptionsKey({
      gamma: 1,
      contrast: { percentile: 99.5, mode: 'auto' },
      colormap: 'inferno',
      colourBy: 'density',
      method: 'histogram',
    })
    expect(renderOptionsKey({})).toBe(written)
    expect(renderOptionsKey({ filter: { channel: 1, frameMin: 3 } })).toBe(
      renderOptionsKey({ filter: { frameMin: 3, channel: 1 } }),
    )
  })

  it('drops settings that do not apply and tells different images apart', () => {
    expect(renderOptionsKey({ gaussian: { sigmaNm: 20 } })).toBe(renderOptionsKey({}))
    expect(renderOptionsKey({ method: 'gaussian' })).not.toBe(renderOptionsKey({}))
    expect(renderOptionsKey({ method: 'gaussian', gaussian: { sigmaNm: 20 } })).not.toBe(
      renderOptionsKey({ method: 'gaussian' }),
    )
    expect(renderOptionsKey({ colourBy: 'channels', colormap: 'magma' })).toBe(
      renderOptionsKey({ colourBy: 'channels' }),
    )
    expect(renderOptionsKey({ valueRange: { min: 0, max: 5 } })).toBe(renderOptionsKey({}))
    expect(resolveRenderOptions({ colourBy: 'z' }).colormap).toBe('viridis')
    // Unusable values take the default that is actually drawn, so they share its key.
    const gaussian = (g: object) => renderOptionsKey({ method: 'gaussian', gaussian: g })
    expect(gaussian({ sigmaNm: -5, truncateSigmas: 0 })).toBe(gaussian({}))
    expect(gaussian({ truncateSigmas: 100 })).toBe(gaussian({ truncateSigmas: 6 }))
  })
})

describe('renderImage', () => {
  const view: RenderView = { xMinNm: 0, yMinNm: 0, pixelNm: 10, width: 4, height: 4 }
  const locs = tableOf({ x: [5, 15, 15], y: [5, 5, 25], frame: [0, 10, 20] })

  it('draws density, time and channel images of the view’s size', () => {
    for (const colourBy of ['density', 'frame', 'channels'] as const) {
      for (const method of ['histogram', 'gaussian'] as const) {
        const image = renderImage(locs, view, { colourBy, method })
        expect(image.rgb).toHaveLength(4 * 4 * 3)
      }
    }
  })

  it('colours by z through the range given: z at the top of the range is viridis(1) = #fde725', () => {
    const withZ = tableOf({ x: [5, 35], y: [5, 35], z: [100, 0] })
    const image = renderImage(withZ, view, {
      colourBy: 'z',
      valueRange: { min: 0, max: 100 },
      contrast: { mode: 'manual', low: 0, high: 1 },
    })
    expect(Array.from(image.rgb.subarray(0, 3))).toEqual([0xfd, 0xe7, 0x25])
    expect(Array.from(image.rgb.subarray(45, 48))).toEqual([0x44, 0x01, 0x54]) // viridis(0)
    expect(Array.from(image.rgb.subarray(3, 6))).toEqual([0, 0, 0]) // no localizations
  })

  it('says what it drew instead when the table lacks the column asked for', () => {
    expect(renderImage(locs, view, { colourBy: 'z' }).reason).toMatch(/no z column/)
    expect(renderImage(locs, view, { colourBy: 'channels' }).reason).toMatch(/no channel column/)
    const nowhere = renderImage(locs, { ...view, pixelNm: -1 })
    expect([nowhere.rgb.length, nowhere.reason]).toEqual([0, expect.stringMatching(/view/)])
  })
})
