// @vitest-environment node
import { describe, expect, it } from 'vitest'
import { fft2d, fft2dTransposed } from '../../../../server/compute/fft'
import { ringSums } from '../../../../server/compute/frc/ring-sums'
import { createRandom } from '../../../fixtures/spot-simulation'
import { naiveDft2d } from '../fft/naive-dft'

function randomCounts(size: number, seed: number): Float32Array {
  const random = createRandom(seed)
  return Float32Array.from({ length: size * size }, () => Math.floor(random() * 4))
}

function packedSpectrum(a: Float32Array, b: Float32Array, size: number, transposed = false) {
  const re = a.slice()
  const im = b.slice()
  if (transposed) fft2dTransposed(re, im, size)
  else fft2d(re, im, size)
  return { re, im }
}

/** Ring of frequency (u, v) by the definition in DOMAIN.md §1.4: one frequency pixel wide. */
function ringOf(u: number, v: number, size: number): number {
  const fu = u < size / 2 ? u : u - size
  const fv = v < size / 2 ? v : v - size
  return Math.round(Math.hypot(fu, fv))
}

describe('FRC ring sums', () => {
  // Source: FRC definition (Nieuwenhuizen 2013; DOMAIN.md §1.4 check): FRC(image, itself) = 1.
  it('gives FRC = 1 on every ring for an image against itself', () => {
    const size = 64
    const image = randomCounts(size, 1)
    const { re, im } = packedSpectrum(image, image, size)
    const sums = ringSums(re, im, size)
    for (let k = 0; k < sums.pixels.length; k++) {
      expect(sums.numerator[k]! / Math.sqrt(sums.powerA[k]! * sums.powerB[k]!)).toBeCloseTo(1, 6)
    }
  })

  // Source: brute force — each half transformed on its own by the naive DFT, then
  // Re Σ F_A F_B*, Σ|F_A|², Σ|F_B|² and the pixel count summed ring by ring from the definition.
  it.each([false, true])(
    'matches ring sums of separately transformed halves (16×16, transposed: %s)',
    (transposed) => {
      const size = 16
      const a = randomCounts(size, 2)
      const b = randomCounts(size, 3)
      const zeros = new Float64Array(size * size)
      const fa = naiveDft2d(a, zeros, size)
      const fb = naiveDft2d(b, zeros, size)
      const rings = size / 2 + 1
      const expected = { numerator: new Array(rings).fill(0), powerA: new Array(rings).fill(0) }
      const pixels = new Array<number>(rings).fill(0)
      for (let v = 0; v < size; v++) {
        for (let u = 0; u < size; u++) {
          const k = ringOf(u, v, size)
          if (k >= rings) continue
          const i = v * size + u
          expected.numerator[k] += fa.re[i]! * fb.re[i]! + fa.im[i]! * fb.im[i]!
          expected.powerA[k] += fa.re[i]! ** 2 + fa.im[i]! ** 2
          pixels[k]!++
        }
      }
      const { re, im } = packedSpectrum(a, b, size, transposed)
      const sums = ringSums(re, im, size)
      for (let k = 0; k < rings; k++) {
        expect(sums.numerator[k]).toBeCloseTo(expected.numerator[k], 2)
        expect(sums.powerA[k]).toBeCloseTo(expected.powerA[k], 2)
        expect(sums.pixels[k]).toBe(pixels[k])
      }
    },
  )
})
