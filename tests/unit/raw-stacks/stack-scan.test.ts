// @vitest-environment node
import { truncateSync, writeFileSync } from 'node:fs'
import { writeArrayBuffer } from 'geotiff'
import sharp from 'sharp'
import { afterAll, describe, expect, it } from 'vitest'
import { readStackHeader, scanStack } from '@server/compute/raw-stacks'
import { patchUint, writeTiffStack, type TiffStackSpec } from '../../fixtures/tiff-writer'
import { classicValueField, ramp, temporaryFolder } from './stack-fixtures'

const folder = temporaryFolder()
afterAll(folder.cleanup)

const W = 9
const H = 7
const FRAMES = 6
const truth = ramp(W, H, 1000)

function write(name: string, spec: Partial<TiffStackSpec> = {}) {
  const path = folder.file(name)
  writeTiffStack(path, { width: W, height: H, frames: FRAMES, pixels: truth.pixels, ...spec })
  return path
}

async function expectRampScan(paths: string[], frames = FRAMES) {
  const scan = await scanStack({ paths })
  expect([scan.frames, scan.width, scan.height]).toEqual([frames, W, H])
  // Exact: every value is an integer and the sums stay far below 2^53.
  expect(Array.from(scan.meanTrace)).toEqual(
    Array.from({ length: frames }, (_, t) => truth.frameMean(t)),
  )
  expect(Array.from(scan.maxProjection)).toEqual(truth.max(frames))
  expect(Array.from(scan.meanProjection)).toEqual(truth.mean(frames))
  return scan
}

describe('scanStack against stacks of known values', () => {
  it.each([
    { kind: 'classic', littleEndian: true },
    { kind: 'classic', littleEndian: false },
    { kind: 'bigtiff', littleEndian: true },
    { kind: 'bigtiff', littleEndian: false },
  ] as const)(
    '$kind, little-endian $littleEndian: trace and projections are exact',
    async (variant) => {
      await expectRampScan([write(`ramp-${variant.kind}-${variant.littleEndian}.tif`, variant)])
    },
  )

  it('reads RowsPerStrip 0 (invalid) as one strip per frame', async () => {
    const path = folder.file('rows-zero.tif')
    const { ifdOffsets } = writeTiffStack(path, {
      width: W,
      height: H,
      frames: FRAMES,
      pixels: truth.pixels,
    })
    for (const ifd of ifdOffsets) patchUint(path, classicValueField(ifd, 278), 0, 4)
    await expectRampScan([path])
  })

  it('reads frames split into several strips, also at odd offsets', async () => {
    await expectRampScan([write('strips.tif', { rowsPerStrip: 2 })])
    await expectRampScan([write('rows.tif', { rowsPerStrip: 1, kind: 'bigtiff' })])
    await expectRampScan([write('odd.tif', { rowsPerStrip: 3, misalignPixels: true })])
    await expectRampScan([write('odd-be.tif', { misalignPixels: true, littleEndian: false })])
  })

  it('reads 8-bit and float32 samples', async () => {
    const bytes = ramp(4, 4, 10)
    const scan8 = await scanStack({
      paths: [write('u8.tif', { width: 4, height: 4, sampleType: 'uint8', pixels: bytes.pixels })],
    })
    expect(Array.from(scan8.meanTrace)).toEqual(
      Array.from({ length: FRAMES }, (_, t) => bytes.frameMean(t)),
    )
    // Halves and quarters are exact in float32, so the expected means are exact too.
    const fine = (frame: number) => truth.pixels(frame).map((v) => v / 4 - 100)
    const scan32 = await scanStack({
      paths: [write('f32.tif', { sampleType: 'float32', pixels: fine, littleEndian: false })],
    })
    expect(Array.from(scan32.meanTrace)).toEqual(
      Array.from({ length: FRAMES }, (_, t) => truth.frameMean(t) / 4 - 100),
    )
    expect(Array.from(scan32.maxProjection)).toEqual(truth.max(FRAMES).map((v) => v / 4 - 100))
  })

  it('decodes Deflate strips (compressed by zlib) with and without Predictor 2', async () => {
    await expectRampScan([write('deflate.tif', { compression: 'deflate', rowsPerStrip: 3 })])
    await expectRampScan([write('deflate-pred.tif', { compression: 'deflate', predictor: true })])
    await expectRampScan([
      write('deflate-pred-be.tif', {
        compression: 'deflate',
        predictor: true,
        littleEndian: false,
        kind: 'bigtiff',
      }),
    ])
  })

  it('reads offsets past 2^31 (classic) and past 2^32 (BigTIFF) in sparse multi-GB files', async () => {
    const classic = write('sparse-classic.tif', { frames: 3, gapBytes: 1.2e9 })
    const big = write('sparse-big.tif', {
      frames: 3,
      gapBytes: 2.5e9,
      kind: 'bigtiff',
      littleEndian: false,
    })
    expect((await readStackHeader(classic)).fileBytes).toBeGreaterThan(2 ** 31 + 2 ** 30)
    expect((await readStackHeader(big)).fileBytes).toBeGreaterThan(2 ** 32 + 2 ** 31)
    await expectRampScan([classic], 3)
    await expectRampScan([big], 3)
  })

  it('treats several files as one stack, frames in the order given', async () => {
    const offset = ramp(W, H, 1000)
    const first = write('part-0.tif', { frames: 4 })
    const second = write('part-1.tif', {
      frames: 2,
      pixels: (t) => offset.pixels(t + 4),
      kind: 'bigtiff',
    })
    await expectRampScan([first, second], 6)
  })

  it('reports progress at least every 2 % and ends at 1', async () => {
    const path = write('progress.tif', {
      width: 2,
      height: 2,
      frames: 250,
      pixels: () => [1, 2, 3, 4],
    })
    const fractions: number[] = []
    await scanStack({ paths: [path], onProgress: (f) => fractions.push(f) })
    expect(fractions.at(-1)).toBe(1)
    const steps = fractions.map((f, i) => f - (fractions[i - 1] ?? 0))
    expect(Math.max(...steps)).toBeLessThanOrEqual(0.02)
  })
})

describe('scanStack on files from independent writers', () => {
  const pages = (frames: number) => {
    const all = new Uint16Array(W * H * frames)
    for (let t = 0; t < frames; t++) all.set(truth.pixels(t), t * W * H)
    return sharp(all, {
      raw: { width: W, height: H * frames, channels: 1, pageHeight: H },
    }).toColourspace('grey16')
  }

  it.each(['none', 'lzw', 'deflate', 'packbits'])(
    'sharp (libvips/libtiff) multi-page 16-bit TIFF, compression %s',
    async (compression) => {
      const path = folder.file(`sharp-${compression}.tif`)
      await pages(FRAMES).tiff({ compression, predictor: 'horizontal' }).toFile(path)
      await expectRampScan([path])
    },
  )

  it('sharp BigTIFF (Deflate, as sharp writes BigTIFF only when compressing)', async () => {
    const path = folder.file('sharp-big.tif')
    await pages(FRAMES).tiff({ compression: 'deflate', bigtiff: true }).toFile(path)
    expect(await readStackHeader(path)).toMatchObject({ format: 'bigtiff', frames: FRAMES })
    await expectRampScan([path])
  })

  it('geotiff big-endian float32 (single page)', async () => {
    const path = folder.file('geotiff-f32.tif')
    const values = new Float32Array([0.5, 1.5, -2.25, 3, 4, 5])
    writeFileSync(path, Buffer.from(writeArrayBuffer(values, { width: 3, height: 2 })))
    const scan = await scanStack({ paths: [path] })
    expect(Array.from(scan.maxProjection)).toEqual(Array.from(values))
    expect(scan.meanTrace[0]).toBe(11.75 / 6)
  })
})

describe('scanStack refuses what it cannot read, with a reason', () => {
  const failure = (paths: string[]) =>
    scanStack({ paths }).then(
      () => null,
      (error: unknown) => error,
    )

  it('names a compression it cannot decode', async () => {
    const path = folder.file('jpeg2000.tif')
    const { ifdOffsets } = writeTiffStack(path, {
      width: W,
      height: H,
      frames: 2,
      pixels: truth.pixels,
    })
    patchUint(path, classicValueField(ifdOffsets[0]!, 259), 34712, 4)
    expect(await failure([path])).toMatchObject({
      code: 'unsupported',
      message: expect.stringContaining(
        'Frame 0 uses jpeg2000 compression, which cannot be scanned',
      ),
    })
  })

  it('reports a middle frame whose strip lies past the end (found by the pass, not the header)', async () => {
    const path = folder.file('middle-out.tif')
    const { ifdOffsets, bytes } = writeTiffStack(path, {
      width: W,
      height: H,
      frames: 3,
      pixels: truth.pixels,
    })
    patchUint(path, classicValueField(ifdOffsets[1]!, 273), bytes + 10, 4)
    expect(await failure([path])).toMatchObject({
      code: 'truncated',
      message: `Truncated file: it ends at byte ${bytes} but frame 1 points to byte ${bytes + 10 + W * H * 2} (the end of its pixel data)`,
    })
  })

  it('refuses frames too large to project in memory, before reading pixels', async () => {
    const path = folder.file('huge.tif')
    const { ifdOffsets } = writeTiffStack(path, {
      width: W,
      height: H,
      frames: 1,
      pixels: truth.pixels,
    })
    patchUint(path, classicValueField(ifdOffsets[0]!, 256), 9000, 4)
    patchUint(path, classicValueField(ifdOffsets[0]!, 257), 9000, 4)
    expect(await failure([path])).toMatchObject({
      code: 'unsupported',
      message: expect.stringContaining('Frames of 9000×9000 are larger than'),
    })
  })

  it('refuses horizontal differencing on float samples', async () => {
    const withPredictor = folder.file('float-predictor-2.tif')
    writeTiffStack(withPredictor, {
      width: W,
      height: H,
      frames: 1,
      pixels: truth.pixels,
      predictor: true,
      sampleType: 'float32',
    })
    expect(await failure([withPredictor])).toMatchObject({
      message: expect.stringContaining('predictor 2 on float samples'),
    })
  })

  it('reports frames whose size differs from the first', async () => {
    const big = write('size-a.tif', { frames: 2 })
    const small = write('size-b.tif', {
      width: 3,
      height: 3,
      frames: 1,
      pixels: () => new Array(9).fill(1),
    })
    expect(await failure([big, small])).toMatchObject({
      code: 'mismatch',
      message: 'Frame 2 is 3×3 16-bit uint but frame 0 is 9×7 16-bit uint',
    })
  })

  it('reports a file cut inside the pixel data of its last frame', async () => {
    const path = folder.file('cut-pixels.tif')
    const { ifdOffsets } = writeTiffStack(path, {
      width: W,
      height: H,
      frames: 3,
      pixels: truth.pixels,
    })
    // Chain intact, strips of frame 2 point behind the new end: move them out of reach.
    patchUint(path, classicValueField(ifdOffsets[2]!, 273), ifdOffsets[2]! + 4000, 4)
    truncateSync(path, ifdOffsets[2]! + 400)
    expect(await failure([path])).toMatchObject({
      code: 'truncated',
      message: expect.stringContaining('frame 2 points to byte'),
    })
  })
})
