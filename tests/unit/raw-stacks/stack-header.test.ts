// @vitest-environment node
import { truncateSync, writeFileSync } from 'node:fs'
import { fromFile, writeArrayBuffer } from 'geotiff'
import sharp from 'sharp'
import { afterAll, describe, expect, it } from 'vitest'
import { RawStackError, readStackHeader } from '@server/compute/raw-stacks'
import { patchUint, writeTiffStack } from '../../fixtures/tiff-writer'
import { MINIMUM_OME_XML, classicValueField, ramp, temporaryFolder } from './stack-fixtures'

const folder = temporaryFolder()
afterAll(folder.cleanup)

const variants = [
  { kind: 'classic', littleEndian: true },
  { kind: 'classic', littleEndian: false },
  { kind: 'bigtiff', littleEndian: true },
  { kind: 'bigtiff', littleEndian: false },
] as const

describe('readStackHeader on stacks of known layout', () => {
  it.each(variants)(
    '$kind, little-endian $littleEndian: size, frames, byte order',
    async (variant) => {
      const path = folder.file(`known-${variant.kind}-${variant.littleEndian}.tif`)
      writeTiffStack(path, { ...ramp(7, 5, 3), width: 7, height: 5, frames: 9, ...variant })
      const header = await readStackHeader(path)
      expect(header).toMatchObject({
        format: variant.kind === 'bigtiff' ? 'bigtiff' : 'tiff',
        byteOrder: variant.littleEndian ? 'little-endian' : 'big-endian',
        width: 7,
        height: 5,
        bitsPerSample: 16,
        sampleFormat: 'uint',
        samplesPerPixel: 1,
        compression: 'none',
        frames: 9,
        planarConfiguration: 'chunky',
        omeXml: null,
        uniformPages: true,
      })
      expect(header.pages).toHaveLength(9)
      // Reference reader on the same file: geotiff walks the chain independently.
      const reference = await fromFile(path)
      expect(await reference.getImageCount()).toBe(9)
      const last = await reference.getImage(8)
      expect([last.getWidth(), last.getHeight()]).toEqual([7, 5])
    },
  )

  it('reads a multi-page 16-bit TIFF written by sharp (libvips/libtiff)', async () => {
    const path = folder.file('sharp-pages.tif')
    const pixels = new Uint16Array(6 * 4 * 5).map((_, i) => i * 300)
    await sharp(pixels, { raw: { width: 6, height: 4 * 5, channels: 1, pageHeight: 4 } })
      .toColourspace('grey16')
      .tiff({ compression: 'lzw' })
      .toFile(path)
    const header = await readStackHeader(path)
    expect(header).toMatchObject({
      format: 'tiff',
      width: 6,
      height: 4,
      frames: 5,
      bitsPerSample: 16,
      compression: 'lzw',
    })
  })

  it('reads a big-endian float TIFF with SHORT dimensions written by geotiff (another writer)', async () => {
    const path = folder.file('geotiff-float.tif')
    const values = new Float32Array([0.5, 1.5, -2.25, 3, 4, 5])
    writeFileSync(path, Buffer.from(writeArrayBuffer(values, { width: 3, height: 2 })))
    const header = await readStackHeader(path)
    expect(header).toMatchObject({
      byteOrder: 'big-endian',
      width: 3,
      height: 2,
      frames: 1,
      bitsPerSample: 32,
      sampleFormat: 'float',
    })
  })

  it('walks a chain of 2500 directories (past one pause for the event loop)', async () => {
    const path = folder.file('long-chain.tif')
    writeTiffStack(path, { width: 1, height: 1, frames: 2500, pixels: (t) => [t], kind: 'bigtiff' })
    const header = await readStackHeader(path)
    expect(header.frames).toBe(2500)
    expect(header.pages[2499]).toMatchObject({
      width: 1,
      height: 1,
      bitsPerSample: 16,
      compression: 'none',
      subfileType: 0,
    })
  })

  it('finds 8-bit and float32 sample types', async () => {
    const bytePath = folder.file('uint8.tif')
    const floatPath = folder.file('float32.tif')
    writeTiffStack(bytePath, {
      ...ramp(3, 3, 1),
      width: 3,
      height: 3,
      frames: 2,
      sampleType: 'uint8',
    })
    writeTiffStack(floatPath, {
      ...ramp(3, 3, 1),
      width: 3,
      height: 3,
      frames: 2,
      sampleType: 'float32',
    })
    expect(await readStackHeader(bytePath)).toMatchObject({
      bitsPerSample: 8,
      sampleFormat: 'uint',
    })
    expect(await readStackHeader(floatPath)).toMatchObject({
      bitsPerSample: 32,
      sampleFormat: 'float',
    })
  })
})

describe('OME-XML in the first ImageDescription', () => {
  it.each(['classic', 'bigtiff'] as const)(
    'returns the specification sample document unchanged (%s)',
    async (kind) => {
      const path = folder.file(`ome-${kind}.ome.tif`)
      writeTiffStack(path, {
        ...ramp(2, 2, 1),
        width: 2,
        height: 2,
        frames: 8,
        kind,
        description: MINIMUM_OME_XML,
      })
      const header = await readStackHeader(path)
      expect(header.omeXml).toBe(MINIMUM_OME_XML)
      // geotiff reads the same description (with its NUL, which we strip).
      const image = await (await fromFile(path)).getImage(0)
      expect(
        String(await image.fileDirectory.loadValue('ImageDescription')).replace(/\0+$/, ''),
      ).toBe(MINIMUM_OME_XML)
    },
  )

  it('ignores a description that is not OME-XML', async () => {
    const path = folder.file('plain-description.tif')
    writeTiffStack(path, {
      ...ramp(2, 2, 1),
      width: 2,
      height: 2,
      frames: 1,
      description: 'exposure 30 ms',
    })
    expect((await readStackHeader(path)).omeXml).toBeNull()
  })
})

describe('damaged files give clear errors', () => {
  const failure = (path: string) =>
    readStackHeader(path).then(
      () => null,
      (error: unknown) => error,
    )

  it('names the end of the file and the pointer past it when the upload was cut short', async () => {
    const path = folder.file('cut.tif')
    const written = writeTiffStack(path, { ...ramp(8, 8, 1), width: 8, height: 8, frames: 10 })
    const cutAt = written.ifdOffsets[6]! - 5
    truncateSync(path, cutAt)
    const error = await failure(path)
    expect(error).toBeInstanceOf(RawStackError)
    expect(error).toMatchObject({ code: 'truncated' })
    expect(String(error)).toContain(
      `it ends at byte ${cutAt} but frame 5 points to byte ${written.ifdOffsets[6]} (the directory of frame 6)`,
    )
  })

  it('names the directory that runs past the end when the cut falls inside it', async () => {
    const path = folder.file('cut-in-ifd.tif')
    const written = writeTiffStack(path, { ...ramp(8, 8, 1), width: 8, height: 8, frames: 10 })
    truncateSync(path, written.ifdOffsets[6]! + 40)
    // Classic IFD: 2-byte count, 12 entries of 12 bytes, 4-byte next pointer.
    const end = written.ifdOffsets[6]! + 2 + 12 * 12 + 4
    expect(await failure(path)).toMatchObject({
      code: 'truncated',
      message: `Truncated file: it ends at byte ${written.ifdOffsets[6]! + 40} but the directory of frame 6 runs to byte ${end}`,
    })
  })

  it('notices pixel data of the last frame running past the end', async () => {
    const path = folder.file('pixels-cut.tif')
    // Point frame 2's strip offset far out; its IFD and the chain stay intact.
    const written = writeTiffStack(path, { ...ramp(8, 8, 1), width: 8, height: 8, frames: 3 })
    const stripOffsetField = classicValueField(written.ifdOffsets[2]!, 273)
    patchUint(path, stripOffsetField, 1_000_000, 4)
    const error = await failure(path)
    expect(error).toMatchObject({ code: 'truncated' })
    expect(String(error)).toContain(
      `frame 2 points to byte ${1_000_000 + 128} (the end of its pixel data)`,
    )
  })

  it.each(['classic', 'bigtiff'] as const)(
    'stops at a loop in the IFD chain (%s)',
    async (kind) => {
      const path = folder.file(`loop-${kind}.tif`)
      const written = writeTiffStack(path, {
        ...ramp(4, 4, 1),
        width: 4,
        height: 4,
        frames: 6,
        kind,
      })
      patchUint(
        path,
        written.nextPointerPositions[5]!,
        written.ifdOffsets[2]!,
        kind === 'bigtiff' ? 8 : 4,
      )
      const error = await failure(path)
      expect(error).toMatchObject({ code: 'ifd-loop' })
      expect(String(error)).toContain(
        `IFD chain loops back at byte ${written.ifdOffsets[2]}: frame 5 points to the directory of frame 2`,
      )
    },
  )

  it('refuses a directory pointer into the file header', async () => {
    const path = folder.file('into-header.tif')
    const written = writeTiffStack(path, { ...ramp(4, 4, 1), width: 4, height: 4, frames: 2 })
    patchUint(path, written.nextPointerPositions[0]!, 2, 4)
    expect(await failure(path)).toMatchObject({
      code: 'malformed',
      message: expect.stringContaining('frame 0 points to byte 2'),
    })
  })

  it('refuses a file that is not TIFF', async () => {
    const path = folder.file('not-a-stack.tif')
    writeFileSync(path, 'just some text, not an image')
    expect(await failure(path)).toMatchObject({ code: 'not-tiff' })
  })
})
