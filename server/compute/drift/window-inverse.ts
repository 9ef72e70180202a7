import FFT from 'fft.js'

/**
 * Inverse 2D FFT of a centred correlation spectrum, computed only for the square of shifts within
 * `reach` pixels of the centre: every row is transformed (all are needed), but only the 2·reach + 1
 * central columns, and no transposes. Normalized like the full inverse (1/size²). The real and
 * imaginary outputs are (2·reach + 1)² row-major windows whose centre is zero shift.
 */
export class WindowInverse {
  readonly width: number
  readonly re: Float64Array
  readonly im: Float64Array
  private readonly fft: FFT
  private readonly input: Float64Array
  private readonly output: Float64Array
  private readonly rowsRe: Float64Array
  private readonly rowsIm: Float64Array

  constructor(
    private readonly size: number,
    private readonly reach: number,
  ) {
    this.width = 2 * reach + 1
    this.re = new Float64Array(this.width * this.width)
    this.im = new Float64Array(this.width * this.width)
    this.fft = new FFT(size)
    this.input = new Float64Array(2 * size)
    this.output = new Float64Array(2 * size)
    this.rowsRe = new Float64Array(size * this.width)
    this.rowsIm = new Float64Array(size * this.width)
  }

  /** Transforms the spectrum (re, im), each size² long, into this.re / this.im. */
  run(re: Float64Array, im: Float64Array) {
    const { size, width, input, output } = this
    const first = size / 2 - this.reach
    for (let row = 0; row < size; row++) {
      const base = row * size
      for (let u = 0; u < size; u++) {
        input[2 * u] = re[base + u] ?? 0
        input[2 * u + 1] = im[base + u] ?? 0
      }
      this.fft.inverseTransform(output, input)
      for (let w = 0; w < width; w++) {
        this.rowsRe[row * width + w] = output[2 * (first + w)] ?? 0
        this.rowsIm[row * width + w] = output[2 * (first + w) + 1] ?? 0
      }
    }
    for (let w = 0; w < width; w++) {
      for (let row = 0; row < size; row++) {
        input[2 * row] = this.rowsRe[row * width + w] ?? 0
        input[2 * row + 1] = this.rowsIm[row * width + w] ?? 0
      }
      this.fft.inverseTransform(output, input)
      for (let k = 0; k < width; k++) {
        this.re[k * width + w] = output[2 * (first + k)] ?? 0
        this.im[k * width + w] = output[2 * (first + k) + 1] ?? 0
      }
    }
  }
}
