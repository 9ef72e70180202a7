import { fft2d } from './fft-2d'
import { mirrorIndex } from './real-pair'

/**
 * Circular cross-correlation of two real size×size images with one forward and one inverse FFT:
 *   c(s) = Σ_x a(x) · b(x + s)   (indices mod size),
 * so if b is a copied and moved by d (b(x) = a(x − d)), c peaks at s = d.
 * The result is centred: shift (dx, dy) sits at row size/2 + dy, column size/2 + dx, so zero shift
 * is at (size/2, size/2) and shifts run from −size/2 to size/2 − 1 on each axis without wrapping
 * around the peak of small drifts.
 */
export function crossCorrelation2d(
  a: ArrayLike<number>,
  b: ArrayLike<number>,
  size: number,
): Float64Array {
  const re = Float64Array.from(a)
  const im = Float64Array.from(b)
  fft2d(re, im, size)
  conjugateATimesB(re, im, size)
  fft2d(re, im, size, true)
  return re
}

/**
 * Overwrites the packed spectrum Z = FFT(a + i·b) with conj(A)·B · (−1)^(u+v); the sign factor moves
 * zero shift to the centre. Each pair k, −k is handled together because both values are needed
 * before either is overwritten; conj(A)·B at −k is the conjugate of its value at k.
 */
function conjugateATimesB(re: Float64Array, im: Float64Array, size: number): void {
  const count = size * size
  for (let k = 0; k < count; k++) {
    const m = mirrorIndex(k, size)
    if (m < k) continue
    const zr = re[k]!
    const zi = im[k]!
    const wr = re[m]!
    const wi = im[m]!
    const aRe = (zr + wr) / 2
    const aIm = (zi - wi) / 2
    const bRe = (zi + wi) / 2
    const bIm = (wr - zr) / 2
    const row = Math.floor(k / size)
    const sign = (row + k - row * size) % 2 === 0 ? 1 : -1
    const productRe = sign * (aRe * bRe + aIm * bIm)
    const productIm = sign * (aRe * bIm - aIm * bRe)
    re[k] = productRe
    im[k] = productIm
    re[m] = productRe
    im[m] = -productIm
  }
}
