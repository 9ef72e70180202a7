import { readUnsignedValues } from './ifd-values.reader'
import type { PageDirectory } from './page.directory'
import type { ProjectionAccumulator } from './projection.accumulator'
import { RawStackError } from './raw-stack.error'
import { SequentialReader } from './sequential.reader'
import type { OpenStack } from './stack-header.service'
import type { FrameLayout } from './stack-layout'
import { type StripCodec, stripCodec } from './strip.decompressor'
import { SampleConverter, sampleTypeOf, undoHorizontalDifferencing } from './strip-samples.decoder'

export interface ScanContext {
  accumulator: ProjectionAccumulator
  layout: FrameLayout
  /** Called after each frame with its index across all files. */
  frameDone: (frame: number) => void
  signal?: AbortSignal
}

interface Strips {
  offsets: Float64Array
  byteCounts: Float64Array | null
}

function stripsOf(stack: OpenStack, page: PageDirectory, frame: number): Strips {
  const le = stack.fileHeader.littleEndian
  const what = `frame ${frame}`
  const offsets = readUnsignedValues(stack.file, page.stripOffsets!, le, `${what} (strip offsets)`)
  const counts =
    page.stripByteCounts &&
    readUnsignedValues(stack.file, page.stripByteCounts, le, `${what} (strip sizes)`)
  const needed = Math.ceil(page.height / page.rowsPerStrip)
  if (offsets.length < needed || (counts && counts.length < offsets.length)) {
    throw new RawStackError(
      'malformed',
      `Frame ${frame} lists ${offsets.length} strips but needs ${needed}`,
    )
  }
  return { offsets, byteCounts: counts }
}

function checkedLength<T extends Uint8Array>(
  bytes: T,
  needed: number,
  strip: number,
  frame: number,
): T {
  if (bytes.length < needed) {
    throw new RawStackError(
      'malformed',
      `Frame ${frame}, strip ${strip} holds ${bytes.length} bytes but ${needed} are needed`,
    )
  }
  return bytes
}

/** Per file: where bytes come from and how they become samples (byte order is per file). */
class FileFrames {
  private readonly converter: SampleConverter
  private readonly codecs = new Map<string, StripCodec>()

  constructor(
    private readonly stack: OpenStack,
    private readonly reader: SequentialReader,
    private readonly context: ScanContext,
  ) {
    const { format, bitsPerSample } = context.layout
    this.converter = new SampleConverter(
      sampleTypeOf(format, bitsPerSample, stack.fileHeader.littleEndian, 0),
    )
  }

  async scanFrame(page: PageDirectory, frame: number) {
    const { width } = this.context.layout
    const bytesPerRow = width * (this.context.layout.bitsPerSample / 8)
    const strips = stripsOf(this.stack, page, frame)
    for (let strip = 0; strip * page.rowsPerStrip < page.height; strip++) {
      const rows = Math.min(page.rowsPerStrip, page.height - strip * page.rowsPerStrip)
      const pending = this.stripBytes(page, strips, strip, rows * bytesPerRow, frame)
      const bytes = pending instanceof Promise ? await pending : pending
      const samples = this.converter.convert(bytes.subarray(0, rows * bytesPerRow))
      if (page.predictor === 2) undoHorizontalDifferencing(samples, width)
      this.context.accumulator.addStrip(samples, strip * page.rowsPerStrip * width)
    }
    this.context.accumulator.endFrame(frame)
  }

  /** Synchronous when the strip is uncompressed and already read: most strips, no await. */
  private stripBytes(
    page: PageDirectory,
    strips: Strips,
    strip: number,
    needed: number,
    frame: number,
  ): Buffer | Promise<Buffer> {
    const offset = strips.offsets[strip]!
    const stored = strips.byteCounts?.[strip] ?? needed
    const compressed = page.compressionCode !== 1
    const length = compressed ? stored : Math.min(stored, needed)
    const ready = compressed ? undefined : this.reader.peek(offset, length)
    if (ready) return checkedLength(ready, needed, strip, frame)
    return this.loadStrip(page, offset, length, needed, strip, frame)
  }

  private async loadStrip(
    page: PageDirectory,
    offset: number,
    length: number,
    needed: number,
    strip: number,
    frame: number,
  ): Promise<Buffer> {
    const bytes = await this.reader.read(offset, length)
    if (!bytes) {
      throw new RawStackError(
        'truncated',
        `Truncated file: it ends at byte ${this.reader.size} but frame ${frame} points to byte ${offset + length} (the end of its pixel data)`,
      )
    }
    const decoded =
      page.compressionCode === 1 ? bytes : await (await this.codec(page)).decode(bytes)
    return checkedLength(decoded, needed, strip, frame)
  }

  private async codec(page: PageDirectory): Promise<StripCodec> {
    const key = `${page.compressionCode}/${page.rowsPerStrip}`
    let codec = this.codecs.get(key)
    if (!codec) {
      codec = await stripCodec(
        page.compressionCode,
        page.width,
        page.rowsPerStrip,
        page.bitsPerSample,
      )
      this.codecs.set(key, codec)
    }
    return codec
  }
}

/** Streams every frame of one file into the accumulator; returns the next frame index. */
export async function scanFile(
  stack: OpenStack,
  path: string,
  firstFrame: number,
  context: ScanContext,
) {
  const reader = await SequentialReader.open(path)
  try {
    const frames = new FileFrames(stack, reader, context)
    let frame = firstFrame
    for (const page of stack.directories) {
      if (context.signal?.aborted) throw new RawStackError('aborted', 'The scan was cancelled')
      await frames.scanFrame(page, frame)
      context.frameDone(frame++)
    }
    return { nextFrame: frame, bytesRead: reader.bytesRead }
  } finally {
    await reader.close()
  }
}
