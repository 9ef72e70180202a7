import type { Samples } from './strip-samples.decoder'

/**
 * Running per-pixel sum and maximum over frames, and one mean per frame. Sums are float64, so
 * integer data stays exact up to 2^53 (65 535 × 10^5 frames is far below).
 */
export class ProjectionAccumulator {
  readonly sum: Float64Array
  readonly max: Float64Array
  readonly meanTrace: Float64Array
  private frameSum = 0

  constructor(
    readonly pixels: number,
    frames: number,
  ) {
    this.sum = new Float64Array(pixels)
    this.max = new Float64Array(pixels).fill(-Infinity)
    this.meanTrace = new Float64Array(frames)
  }

  /** Adds one strip whose first sample is pixel `firstPixel` of the current frame. */
  addStrip(samples: Samples, firstPixel: number): void {
    const { sum, max } = this
    const count = Math.min(samples.length, this.pixels - firstPixel)
    let total = 0
    for (let i = 0; i < count; i++) {
      const value = samples[i]!
      const pixel = firstPixel + i
      total += value
      sum[pixel] = sum[pixel]! + value
      if (value > max[pixel]!) max[pixel] = value
    }
    this.frameSum += total
  }

  endFrame(frame: number): void {
    this.meanTrace[frame] = this.frameSum / this.pixels
    this.frameSum = 0
  }

  /** Turns the sums into the mean projection in place (the sums are not needed afterwards). */
  meanProjection(frames: number): Float64Array {
    for (let i = 0; i < this.sum.length; i++) this.sum[i] = this.sum[i]! / frames
    return this.sum
  }
}
