import { fft2d } from './fft-2d'

/**
 * Two real images a and b transformed with one complex FFT: Z = FFT(a + i·b). Because a and b are
 * real, their spectra are recovered from Z at k and at the mirrored frequency −k:
 *   A(k) = (Z(k) + conj Z(−k)) / 2,   B(k) = (Z(k) − conj Z(−k)) / (2i).
 * Products follow without forming A and B (W = Z(−k)):
 *   Re A·conj B = Im(Z·W) / 2,   |A|² = (|Z|² + |W|²)/4 + Re(Z·W)/2,   |B|² = … − Re(Z·W)/2.
 */

export interface ComplexImage {
  re: Float64Array
  im: Float64Array
  size: number
}

export interface SplitSpectra {
  aRe: Float64Array
  aIm: Float64Array
  bRe: Float64Array
  bIm: Float64Array
}

/** Index of the frequency −k for the row-major index of k in a size×size spectrum. */
export function mirrorIndex(index: number, size: number): number {
  const mask = size - 1
  const row = Math.floor(index / size)
  const column = index - row * size
  return ((size - row) & mask) * size + ((size - column) & mask)
}

/** Forward FFT of a + i·b (a, b real size×size images, copied), the packed spectrum of both. */
export function transformRealPair(
  a: ArrayLike<number>,
  b: ArrayLike<number>,
  size: number,
): ComplexImage {
  const re = Float64Array.from(a)
  const im = Float64Array.from(b)
  fft2d(re, im, size)
  return { re, im, size }
}

/** The two spectra A and B held in a packed spectrum Z (see the file comment). */
export function splitPairSpectra(packed: ComplexImage): SplitSpectra {
  const { re, im, size } = packed
  const count = size * size
  const split: SplitSpectra = {
    aRe: new Float64Array(count),
    aIm: new Float64Array(count),
    bRe: new Float64Array(count),
    bIm: new Float64Array(count),
  }
  for (let k = 0; k < count; k++) {
    const m = mirrorIndex(k, size)
    const zr = re[k]!
    const zi = im[k]!
    const wr = re[m]!
    const wi = im[m]!
    split.aRe[k] = (zr + wr) / 2
    split.aIm[k] = (zi - wi) / 2
    split.bRe[k] = (zi + wi) / 2
    split.bIm[k] = (wr - zr) / 2
  }
  return split
}
