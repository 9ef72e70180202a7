/**
 * The part of the fft.js package (radix-4 complex FFT) this area uses. Complex arrays are
 * interleaved: [re0, im0, re1, im1, …] of length 2·size.
 */
declare module 'fft.js' {
  type ComplexBuffer = Float64Array | number[]

  class FFT {
    constructor(size: number)
    readonly size: number
    /** Unnormalized forward transform, exp(−2πi·jk/N); `out` and `data` must be different arrays. */
    transform(out: ComplexBuffer, data: ComplexBuffer): void
    /** Inverse transform, exp(+2πi·jk/N), divided by N. */
    inverseTransform(out: ComplexBuffer, data: ComplexBuffer): void
  }

  export = FFT
}
