import type { SampleType, Samples } from './strip-samples.decoder'

type SumArray = Uint32Array | Float64Array
type MaxArray = Uint8Array | Uint16Array | Float64Array

export interface AccumulatorOptions {
  /** Frames after which 32-bit partial sums move into the float64 totals (tests lower it). */
  flushEvery?: number
}

/** Adds `count` samples into the sums and maxima from `first` on; returns their sum. */
function accumulate(
  samples: Samples,
  count: number,
  first: number,
  sum: SumArray,
  max: MaxArray,
): number {
  let total = 0
  for (let i = 0, pixel = first; i < count; i++, pixel++) {
    const value = samples[i]!
    total += value
    sum[pixel] = sum[pixel]! + value
    if (value > max[pixel]!) max[pixel] = value
  }
  return total
}

/**
 * Running per-pixel sum and maximum over frames, and one mean per frame. Small unsigned samples
 * use narrow arrays (32-bit sums, maxima of the sample's own width), which move a third of the
 * memory that float64 would; partial sums go to float64 before they can overflow. Other samples
 * add up in float64, exact for integers up to 2^53.
 */
export class ProjectionAccumulator {
  private readonly partial: SumArray
  private total: Float64Array | null = null
  readonly max: MaxArray
  readonly meanTrace: Float64Array
  private readonly flushEvery: number
  private framesInPartial = 0
  private frameSum = 0

  constructor(
    readonly pixels: number,
    frames: number,
    type: SampleType,
    options: AccumulatorOptions = {},
  ) {
    const narrow = type.format === 'uint' && type.bytes <= 2
    this.partial = narrow ? new Uint32Array(pixels) : new Float64Array(pixels)
    this.max = !narrow
      ? new Float64Array(pixels).fill(-Infinity)
      : type.bytes === 1
        ? new Uint8Array(pixels)
        : new Uint16Array(pixels)
    // (2^32 − 1) / (largest sample) frames fit in a 32-bit sum: 65 537 for 16-bit samples.
    const safeFrames = narrow ? Math.floor((2 ** 32 - 1) / (2 ** (8 * type.bytes) - 1)) : Infinity
    this.flushEvery = narrow ? Math.min(options.flushEvery ?? safeFrames, safeFrames) : Infinity
    this.meanTrace = new Float64Array(frames)
  }

  /** Adds one strip whose first sample is pixel `firstPixel` of the current frame. */
  addStrip(samples: Samples, firstPixel: number): void {
    const count = Math.min(samples.length, this.pixels - firstPixel)
    this.frameSum += accumulate(samples, count, firstPixel, this.partial, this.max)
  }

  endFrame(frame: number): void {
    this.meanTrace[frame] = this.frameSum / this.pixels
    this.frameSum = 0
    if (++this.framesInPartial >= this.flushEvery) this.flush()
  }

  maxProjection(): Float64Array {
    return this.max instanceof Float64Array ? this.max : Float64Array.from(this.max)
  }

  meanProjection(frames: number): Float64Array {
    this.flush()
    const mean = this.total ?? new Float64Array(this.pixels)
    for (let i = 0; i < mean.length; i++) mean[i] = mean[i]! / frames
    return mean
  }

  private flush() {
    if (this.partial instanceof Float64Array) {
      this.total = this.partial
      return
    }
    const total = (this.total ??= new Float64Array(this.pixels))
    for (let i = 0; i < total.length; i++) total[i] = total[i]! + this.partial[i]!
    this.partial.fill(0)
    this.framesInPartial = 0
  }
}
