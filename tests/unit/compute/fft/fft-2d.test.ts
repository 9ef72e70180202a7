// @vitest-environment node
import { describe, expect, it } from 'vitest'
import { fft as packageFft } from 'fft-js'
import { fft2d, fft2dTransposed, transposeSquare } from '../../../../server/compute/fft'
import { createRandom } from '../../../fixtures/spot-simulation'
import { maxAbsDifference, naiveDft2d, randomImage } from './naive-dft'

describe('fft2d', () => {
  // Source: the DFT definition, evaluated directly (naive-dft.ts), on seeded random complex input.
  it.each([2, 4, 8, 16])('matches a naive 2D DFT at %i×%i', (size) => {
    const random = createRandom(1000 + size)
    const re = randomImage(size, random)
    const im = randomImage(size, random)
    const expected = naiveDft2d(re, im, size)
    fft2d(re, im, size)
    expect(maxAbsDifference(re, expected.re)).toBeLessThan(1e-9)
    expect(maxAbsDifference(im, expected.im)).toBeLessThan(1e-9)
  })

  // Source: the DFT definition with exp(+2πi…)/n² (naive-dft.ts).
  it('inverse matches a naive inverse DFT including the 1/size² factor', () => {
    const size = 8
    const random = createRandom(7)
    const re = randomImage(size, random)
    const im = randomImage(size, random)
    const expected = naiveDft2d(re, im, size, true)
    fft2d(re, im, size, true)
    expect(maxAbsDifference(re, expected.re)).toBeLessThan(1e-12)
    expect(maxAbsDifference(im, expected.im)).toBeLessThan(1e-12)
  })

  // Source: the independent fft-js package (recursive Cooley–Tukey). An image with one non-zero
  // row transforms along the columns into that row's 1D spectrum repeated with a phase ramp; at
  // the first row (row index 0) the phase is 1, so row 0 of the 2D result is the 1D FFT.
  it('agrees with the fft-js package in 1D (a single non-zero row)', () => {
    const size = 64
    const random = createRandom(11)
    const signal = Array.from({ length: size }, () => random() - 0.5)
    const re = new Float64Array(size * size)
    const im = new Float64Array(size * size)
    re.set(signal)
    fft2d(re, im, size)
    const reference = packageFft(signal)
    for (let u = 0; u < size; u++) {
      for (let v = 0; v < size; v += 9) {
        expect(re[v * size + u]).toBeCloseTo(reference[u]?.[0] ?? NaN, 10)
        expect(im[v * size + u]).toBeCloseTo(reference[u]?.[1] ?? NaN, 10)
      }
    }
  })

  // Source: Parseval's theorem for the unnormalized DFT, Σ|f|² = Σ|F|² / n² (textbook).
  it('keeps Parseval’s theorem at 256×256', () => {
    const size = 256
    const random = createRandom(3)
    const re = randomImage(size, random)
    const im = randomImage(size, random)
    let energy = 0
    for (let i = 0; i < re.length; i++) energy += re[i]! ** 2 + im[i]! ** 2
    fft2d(re, im, size)
    let spectral = 0
    for (let i = 0; i < re.length; i++) spectral += re[i]! ** 2 + im[i]! ** 2
    expect(spectral / (size * size) / energy).toBeCloseTo(1, 12)
  })

  // Source: the DFT pair identity inverse(forward(x)) = x (textbook).
  it('returns the input after forward then inverse at 512×512', () => {
    const size = 512
    const random = createRandom(5)
    const re = randomImage(size, random)
    const im = randomImage(size, random)
    const original = { re: re.slice(), im: im.slice() }
    fft2d(re, im, size)
    fft2d(re, im, size, true)
    expect(maxAbsDifference(re, original.re)).toBeLessThan(1e-12)
    expect(maxAbsDifference(im, original.im)).toBeLessThan(1e-12)
  })

  // Source: the same naive DFT; Float32 planes only round the stored values between passes.
  it('transforms Float32 planes to float precision', () => {
    const size = 16
    const random = createRandom(8)
    const re = randomImage(size, random)
    const im = randomImage(size, random)
    const expected = naiveDft2d(re, im, size)
    const re32 = Float32Array.from(re)
    const im32 = Float32Array.from(im)
    fft2d(re32, im32, size)
    expect(maxAbsDifference(re32, expected.re)).toBeLessThan(1e-4)
    expect(maxAbsDifference(im32, expected.im)).toBeLessThan(1e-4)
  })

  // Source: the naive DFT, read transposed (F(u,v) at row u, column v).
  it('leaves the transform transposed in fft2dTransposed', () => {
    const size = 8
    const random = createRandom(9)
    const re = randomImage(size, random)
    const im = randomImage(size, random)
    const expected = naiveDft2d(re, im, size)
    fft2dTransposed(re, im, size)
    for (let v = 0; v < size; v++) {
      for (let u = 0; u < size; u++) {
        expect(re[u * size + v]).toBeCloseTo(expected.re[v * size + u]!, 10)
        expect(im[u * size + v]).toBeCloseTo(expected.im[v * size + u]!, 10)
      }
    }
  })

  it('refuses sizes that are not powers of two and arrays of the wrong length', () => {
    expect(() => fft2d(new Float64Array(9), new Float64Array(9), 3)).toThrow(RangeError)
    expect(() => fft2d(new Float64Array(8), new Float64Array(16), 4)).toThrow(RangeError)
  })
})

describe('transposeSquare', () => {
  // Source: definition of the transpose, element by element.
  it.each([2, 16, 64])('transposes a %i×%i matrix in place', (size) => {
    const matrix = Float64Array.from({ length: size * size }, (_, i) => i)
    transposeSquare(matrix, size)
    for (let row = 0; row < size; row++) {
      for (let column = 0; column < size; column++) {
        expect(matrix[row * size + column]).toBe(column * size + row)
      }
    }
  })
})
