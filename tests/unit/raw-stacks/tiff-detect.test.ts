// @vitest-environment node
import { writeFileSync } from 'node:fs'
import sharp from 'sharp'
import { afterAll, describe, expect, it } from 'vitest'
import { detectTiff, detectTiffBytes } from '@server/compute/raw-stacks'
import { writeTiffStack } from '../../fixtures/tiff-writer'
import { ramp, temporaryFolder } from './stack-fixtures'

const folder = temporaryFolder()
afterAll(folder.cleanup)

const bytes = (hex: string) => Buffer.from(hex.replace(/\s/g, ''), 'hex')

describe('detectTiff', () => {
  // Magic numbers from TIFF 6.0 section 2 (II/MM, 42) and the BigTIFF header (43, 8, 0).
  it.each([
    ['classic', 'little', false],
    ['classic', 'big', false],
    ['bigtiff', 'little', true],
    ['bigtiff', 'big', true],
  ] as const)(
    'recognises %s TIFF in %s-endian order from its content',
    async (kind, order, big) => {
      const path = folder.file(`stack-${kind}-${order}.bin`)
      writeTiffStack(path, {
        ...ramp(4, 3, 1),
        width: 4,
        height: 3,
        frames: 2,
        kind: big ? 'bigtiff' : 'classic',
        littleEndian: order === 'little',
      })
      expect(await detectTiff(path)).toBe(kind)
    },
  )

  it('recognises TIFF and BigTIFF written by sharp (libvips/libtiff), an independent writer', async () => {
    const image = sharp({ create: { width: 8, height: 8, channels: 3, background: '#336699' } })
    const classic = folder.file('sharp.tif')
    const big = folder.file('sharp-big.tif')
    await image.clone().tiff({ compression: 'none' }).toFile(classic)
    await image.clone().tiff({ compression: 'deflate', bigtiff: true }).toFile(big)
    expect(await detectTiff(classic)).toBe('classic')
    expect(await detectTiff(big)).toBe('bigtiff')
  })

  it('answers null for a PNG, a text file and an empty file', async () => {
    const png = folder.file('picture.tif')
    await sharp({ create: { width: 4, height: 4, channels: 3, background: '#000' } })
      .png()
      .toFile(png)
    const text = folder.file('notes.tif')
    writeFileSync(text, 'II*\n is how a TIFF starts, but this is text')
    const empty = folder.file('empty.tif')
    writeFileSync(empty, '')
    expect(await detectTiff(png)).toBeNull()
    expect(await detectTiff(text)).toBeNull()
    expect(await detectTiff(empty)).toBeNull()
  })

  it('checks the BigTIFF offset size (8) and the zero that follows it', () => {
    expect(detectTiffBytes(bytes('49492b00 0800 0000 1000000000000000'))).toBe('bigtiff')
    expect(detectTiffBytes(bytes('4d4d002b 0008 0000 0000000000000010'))).toBe('bigtiff')
    expect(detectTiffBytes(bytes('49492b00 0400 0000 1000000000000000'))).toBeNull()
    expect(detectTiffBytes(bytes('49492b00 0800 0100 1000000000000000'))).toBeNull()
    expect(detectTiffBytes(bytes('49492b00 0800 0000'))).toBeNull()
  })

  it('rejects mixed byte-order marks and other version numbers', () => {
    expect(detectTiffBytes(bytes('49492a00 08000000'))).toBe('classic')
    expect(detectTiffBytes(bytes('4d4d002a 00000008'))).toBe('classic')
    expect(detectTiffBytes(bytes('494d2a00 08000000'))).toBeNull()
    expect(detectTiffBytes(bytes('4d4d2a00 00000008'))).toBeNull()
    expect(detectTiffBytes(bytes('49492b'))).toBeNull()
  })
})
