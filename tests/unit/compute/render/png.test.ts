// @vitest-environment node
import { describe, expect, it } from 'vitest'
import sharp from 'sharp'
import { encodePng } from '../../../../server/compute/render'
import { createRandom } from '../../../fixtures/spot-simulation'

describe('PNG encoding', () => {
  it('round-trips through sharp’s decoder pixel for pixel', async () => {
    const width = 37
    const height = 23
    const random = createRandom(41)
    const rgb = Uint8Array.from({ length: width * height * 3 }, () => Math.floor(random() * 256))
    const png = await encodePng(rgb, width, height)
    expect(Array.from(png.subarray(1, 4), (c) => String.fromCharCode(c)).join('')).toBe('PNG')
    const { data, info } = await sharp(png).raw().toBuffer({ resolveWithObject: true })
    expect([info.width, info.height, info.channels]).toEqual([width, height, 3])
    expect(Buffer.compare(data, Buffer.from(rgb))).toBe(0)
  })

  it('refuses a buffer of the wrong size', async () => {
    await expect(encodePng(new Uint8Array(10), 2, 2)).rejects.toThrow(RangeError)
  })
})
