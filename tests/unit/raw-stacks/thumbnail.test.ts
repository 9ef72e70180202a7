// @vitest-environment node
import sharp from 'sharp'
import { describe, expect, it } from 'vitest'
import {
  contrastLimits,
  quantileOfSorted,
  renderThumbnail,
} from '@server/compute/raw-stacks/thumbnail.renderer'

const range = (n: number) => Float64Array.from({ length: n }, (_, i) => i)

async function decodedGray(png: Buffer) {
  const { data, info } = await sharp(png)
    .extractChannel(0)
    .raw()
    .toBuffer({ resolveWithObject: true })
  return { data, info, metadata: await sharp(png).metadata() }
}

describe('contrast limits', () => {
  // Reference: numpy 2.4 np.quantile(x, [0.001, 0.999]) (default 'linear' method, Hyndman & Fan
  // 1996 type 7), run on the same inputs.
  it('match numpy quantiles on 0…999 and 0…127', () => {
    expect(quantileOfSorted(range(1000), 0.001)).toBeCloseTo(0.999, 12)
    expect(quantileOfSorted(range(1000), 0.999)).toBeCloseTo(998.001, 12)
    const { black, white } = contrastLimits(range(128))
    expect(black).toBeCloseTo(0.127, 12)
    expect(white).toBeCloseTo(126.873, 12)
  })

  it('match numpy on unsorted values with repeats, (37·i mod 101) for i < 64', () => {
    const values = Float64Array.from({ length: 64 }, (_, i) => (i * 37) % 101)
    const { black, white } = contrastLimits(values)
    expect(black).toBeCloseTo(0.126, 12)
    expect(white).toBeCloseTo(99.937, 12)
  })

  it('ignore pixels that are not finite', () => {
    expect(contrastLimits(Float64Array.from([Number.NaN, ...range(1000), Infinity]))).toMatchObject(
      { black: expect.closeTo(0.999, 12) },
    )
  })
})

describe('renderThumbnail', () => {
  it('maps the 0.1 % quantile to black and the 99.9 % quantile to white, linearly', async () => {
    const image = range(16 * 8)
    const thumbnail = await renderThumbnail(image, 16, 8)
    const { data, info, metadata } = await decodedGray(thumbnail.png)
    expect(metadata).toMatchObject({ format: 'png', width: 16, height: 8, channels: 1 })
    expect(info.channels).toBe(1)
    const expected = Array.from(image, (v) =>
      Math.min(255, Math.max(0, Math.round(((v - 0.127) / (126.873 - 0.127)) * 255))),
    )
    expect(Array.from(data)).toEqual(expected)
    expect([data[0], data[127]]).toEqual([0, 255])
  })

  it('fits the longest side into 512 pixels, keeping the aspect ratio', async () => {
    const wide = await renderThumbnail(range(1200 * 300), 1200, 300)
    expect([wide.width, wide.height]).toEqual([512, 128])
    const tall = await renderThumbnail(range(256 * 1024), 256, 1024)
    expect([tall.width, tall.height]).toEqual([128, 512])
    expect(await sharp(tall.png).metadata()).toMatchObject({ width: 128, height: 512, channels: 1 })
  })

  it('renders a flat image black instead of dividing by zero', async () => {
    const { data } = await decodedGray(
      (await renderThumbnail(new Float64Array(12).fill(7), 4, 3)).png,
    )
    expect(Array.from(data)).toEqual(new Array(12).fill(0))
  })
})
