import { endianness } from 'node:os'
import { RawStackError } from './raw-stack.error'
import type { SampleFormat } from './tiff.constants'

export type Samples =
  | Uint8Array
  | Int8Array
  | Uint16Array
  | Int16Array
  | Uint32Array
  | Int32Array
  | Float32Array
  | Float64Array

export interface SampleType {
  format: SampleFormat
  bytes: 1 | 2 | 4 | 8
  littleEndian: boolean
}

const NATIVE_LITTLE_ENDIAN = endianness() === 'LE'

type SamplesConstructor = new (
  buffer: ArrayBufferLike,
  byteOffset: number,
  length: number,
) => Samples

const CONSTRUCTORS: Record<string, SamplesConstructor> = {
  'uint-1': Uint8Array,
  'int-1': Int8Array,
  'uint-2': Uint16Array,
  'int-2': Int16Array,
  'uint-4': Uint32Array,
  'int-4': Int32Array,
  'float-4': Float32Array,
  'float-8': Float64Array,
}

export function sampleTypeOf(
  format: SampleFormat,
  bitsPerSample: number,
  littleEndian: boolean,
  frame: number,
): SampleType {
  const bytes = bitsPerSample / 8
  if (
    (bytes !== 1 && bytes !== 2 && bytes !== 4 && bytes !== 8) ||
    !CONSTRUCTORS[`${format}-${bytes}`]
  ) {
    throw new RawStackError(
      'unsupported',
      `Frame ${frame} has ${bitsPerSample}-bit ${format} samples; scanning reads 8-, 16- and 32-bit integers and 32- or 64-bit floats`,
    )
  }
  return { format, bytes, littleEndian }
}

/** Turns strip bytes into numbers, copying only when alignment or byte order demands it. */
export class SampleConverter {
  private scratch = new ArrayBuffer(0)
  private readonly Samples: SamplesConstructor

  constructor(private readonly type: SampleType) {
    this.Samples = CONSTRUCTORS[`${type.format}-${type.bytes}`]!
  }

  /** A view of `bytes` as samples; valid until the next call when it had to copy. */
  convert(bytes: Uint8Array): Samples {
    const { bytes: size, littleEndian } = this.type
    const count = Math.floor(bytes.length / size)
    const swap = size > 1 && littleEndian !== NATIVE_LITTLE_ENDIAN
    if (!swap && bytes.byteOffset % size === 0)
      return new this.Samples(bytes.buffer, bytes.byteOffset, count)
    if (this.scratch.byteLength < count * size) this.scratch = new ArrayBuffer(count * size)
    const copy = Buffer.from(this.scratch, 0, count * size)
    copy.set(bytes.subarray(0, count * size))
    if (swap && size === 2) copy.swap16()
    if (swap && size === 4) copy.swap32()
    if (swap && size === 8) copy.swap64()
    return new this.Samples(this.scratch, 0, count)
  }
}

/** Undoes TIFF Predictor 2 (horizontal differencing) in place; integer arrays wrap as the spec says. */
export function undoHorizontalDifferencing(samples: Samples, width: number): void {
  for (let rowStart = 0; rowStart + width <= samples.length; rowStart += width) {
    for (let i = rowStart + 1; i < rowStart + width; i++) samples[i] = samples[i]! + samples[i - 1]!
  }
}
