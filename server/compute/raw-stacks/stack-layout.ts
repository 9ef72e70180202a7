import type { PageDirectory } from './page.directory'
import { RawStackError } from './raw-stack.error'
import type { OpenStack } from './stack-header.service'
import { isDecodable, unsupportedCompression } from './strip.decompressor'
import { sampleTypeOf } from './strip-samples.decoder'
import { type SampleFormat, sampleFormatName } from './tiff.constants'

/** 8192 × 8192: the projections alone then take about 1.5 GB. */
const MAX_PIXELS = 2 ** 26

/** What every frame of a scannable stack shares. */
export interface FrameLayout {
  width: number
  height: number
  format: SampleFormat
  bitsPerSample: number
}

function describePage(page: PageDirectory): string {
  const format = sampleFormatName(page.sampleFormatCode) ?? `format ${page.sampleFormatCode}`
  return `${page.width}×${page.height} ${page.bitsPerSample}-bit ${format}`
}

function sameFrameShape(page: PageDirectory, reference: PageDirectory): boolean {
  return (
    page.width === reference.width &&
    page.height === reference.height &&
    page.bitsPerSample === reference.bitsPerSample &&
    sampleFormatName(page.sampleFormatCode) === sampleFormatName(reference.sampleFormatCode)
  )
}

function checkScannable(page: PageDirectory, frame: number) {
  if (page.samplesPerPixel !== 1) {
    throw new RawStackError(
      'unsupported',
      `Frame ${frame} has ${page.samplesPerPixel} samples per pixel; only single-channel stacks can be scanned`,
    )
  }
  if (page.tiled || !page.stripOffsets) {
    throw new RawStackError(
      'unsupported',
      `Frame ${frame} is stored in tiles; only strips can be scanned`,
    )
  }
  if (!isDecodable(page.compressionCode)) throw unsupportedCompression(page.compressionCode, frame)
  const floatWithDifferencing = page.predictor === 2 && page.sampleFormatCode === 3
  if ((page.predictor !== 1 && page.predictor !== 2) || floatWithDifferencing) {
    throw new RawStackError(
      'unsupported',
      `Frame ${frame} uses predictor ${page.predictor}${floatWithDifferencing ? ' on float samples' : ''}; ` +
        'scanning supports none (1) and horizontal differencing of integers (2)',
    )
  }
}

/**
 * Checks that all frames of all files have one size and sample type the scanner can read, and
 * returns it. Frames count on across files, in the order the files are given.
 */
export function frameLayoutOf(stacks: OpenStack[]): FrameLayout {
  const first = stacks[0]!
  const reference = first.directories[0]!
  if (reference.width * reference.height > MAX_PIXELS) {
    throw new RawStackError(
      'unsupported',
      `Frames of ${reference.width}×${reference.height} are larger than the ${MAX_PIXELS} pixels a scan holds in memory`,
    )
  }
  const format = first.header.sampleFormat
  sampleTypeOf(format, reference.bitsPerSample, true, 0)
  let frame = 0
  for (const stack of stacks) {
    for (const page of stack.directories) {
      checkScannable(page, frame)
      if (!sameFrameShape(page, reference)) {
        throw new RawStackError(
          'mismatch',
          `Frame ${frame} is ${describePage(page)} but frame 0 is ${describePage(reference)}`,
        )
      }
      frame++
    }
  }
  return {
    width: reference.width,
    height: reference.height,
    format,
    bitsPerSample: reference.bitsPerSample,
  }
}
