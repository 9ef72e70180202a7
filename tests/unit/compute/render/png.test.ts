// @vitest-environment node
import { describe, expect, it } from 'vitest'
import sharp from 'sharp'
import { colormapTable, encodeIndexedPng, encodePng } from '../../../../server/compute/render'
import { createRandom } from '../../../fixtures/spot-simulation'

describe('PNG encoding', () => {
  it('round-trips through sharp’s decoder pixel for pixel', async () => {
    const width = 37
    const height = 23
    const random = createRandom(41)
    const rgb = Uint8Array.from({ length: width * height * 3 }, () => Math.floor(random() * 256))
    const png = encodePng(rgb, width, height)
    expect(Array.from(png.subarray(1, 4), (c) => String.fromCharCode(c)).join('')).toBe('PNG')
    const { data, info } = await sharp(png).raw().toBuffer({ resolveWithObject: true })
    expect([info.width, info.height, info.channels]).toEqual([width, height, 3])
    expect(Buffer.compare(data, Buffer.from(rgb))).toBe(0)
  })

  it('writes chunks that an independent PNG checker accepts, at every compression level', async () => {
    // sharp (libspng) verifies each chunk's CRC and the zlib stream's Adler-32 while decoding.
    const rgb = Uint8Array.from({ length: 256 * 256 * 3 }, (_, i) => (i * 7) % 251)
    for (const level of [0, 1, 6, 9]) {
      const { data } = await sharp(encodePng(rgb, 256, 256, level))
        .raw()
        .toBuffer({ resolveWithObject: true })
      expect(Buffer.compare(data, Buffer.from(rgb))).toBe(0)
    }
  })

  it('is checked for real: the same decoder refuses a chunk whose CRC is off by one bit', async () => {
    const png = Buffer.from(encodePng(new Uint8Array(16 * 16 * 3), 16, 16))
    png[29] = png[29]! ^ 1 // the last byte of IHDR's CRC (after signature 8, length and type 8, data 13)
    await expect(sharp(png).raw().toBuffer()).rejects.toThrow(/CRC/)
  })

  it('refuses a buffer of the wrong size', () => {
    expect(() => encodePng(new Uint8Array(10), 2, 2)).toThrow(RangeError)
    expect(() => encodeIndexedPng(new Uint8Array(3), new Uint8Array(768), 2, 2)).toThrow(RangeError)
  })

  it('writes palette images that the same decoder expands to the palette’s colours', async () => {
    const width = 41
    const height = 19
    const random = createRandom(7)
    const indices = Uint8Array.from({ length: width * height }, () => Math.floor(random() * 256))
    const palette = colormapTable('magma')
    for (const level of [1, 6]) {
      const png = encodeIndexedPng(indices, palette, width, height, level)
      const { data, info } = await sharp(png).raw().toBuffer({ resolveWithObject: true })
      expect([info.width, info.height, info.channels]).toEqual([width, height, 3])
      const expected = Buffer.alloc(width * height * 3)
      indices.forEach((i, p) => expected.set(palette.subarray(3 * i, 3 * i + 3), 3 * p))
      expect(Buffer.compare(data, expected)).toBe(0)
    }
  })

  it('refuses a palette that is empty, ragged or longer than 256 colours', () => {
    const indices = new Uint8Array(4)
    for (const bytes of [0, 4, 257 * 3])
      expect(() => encodeIndexedPng(indices, new Uint8Array(bytes), 2, 2)).toThrow(RangeError)
  })
})
