// @vitest-environment node
import { describe, expect, it } from 'vitest'
import { crossCorrelation2d } from '../../../../server/compute/fft'
import { createRandom } from '../../../fixtures/spot-simulation'
import { maxAbsDifference, randomImage } from './naive-dft'

/** Circular cross-correlation from its definition, c(s) = Σ_x a(x)·b(x + s), centred output. */
function naiveCrossCorrelation(a: Float64Array, b: Float64Array, size: number): Float64Array {
  const out = new Float64Array(size * size)
  const half = size / 2
  for (let dy = -half; dy < half; dy++) {
    for (let dx = -half; dx < half; dx++) {
      let sum = 0
      for (let y = 0; y < size; y++) {
        for (let x = 0; x < size; x++) {
          const by = (((y + dy) % size) + size) % size
          const bx = (((x + dx) % size) + size) % size
          sum += a[y * size + x]! * b[by * size + bx]!
        }
      }
      out[(dy + half) * size + dx + half] = sum
    }
  }
  return out
}

function shifted(image: Float64Array, size: number, dx: number, dy: number): Float64Array {
  const out = new Float64Array(size * size)
  for (let y = 0; y < size; y++) {
    for (let x = 0; x < size; x++) {
      out[((y + dy + size) % size) * size + ((x + dx + size) % size)] = image[y * size + x]!
    }
  }
  return out
}

function argMax(values: Float64Array): number {
  let best = 0
  for (let i = 1; i < values.length; i++) if (values[i]! > values[best]!) best = i
  return best
}

describe('crossCorrelation2d', () => {
  // Source: the definition of circular cross-correlation evaluated directly (O(n⁴)).
  it('matches the direct sum at 16×16', () => {
    const size = 16
    const random = createRandom(21)
    const a = randomImage(size, random)
    const b = randomImage(size, random)
    const expected = naiveCrossCorrelation(a, b, size)
    expect(maxAbsDifference(crossCorrelation2d(a, b, size), expected)).toBeLessThan(1e-10)
  })

  // Source: known ground truth — b is a moved by a chosen (dx, dy), so the peak must sit there.
  it.each([
    [5, -3],
    [-20, 17],
    [0, 0],
    [31, -32],
  ])('peaks at the shift (%i, %i) of a moved copy, 64×64', (dx, dy) => {
    const size = 64
    const image = randomImage(size, createRandom(99))
    const peak = argMax(crossCorrelation2d(image, shifted(image, size, dx, dy), size))
    expect(Math.floor(peak / size) - size / 2).toBe(dy)
    expect((peak % size) - size / 2).toBe(dx)
  })

  it('accepts Float32Array input', () => {
    const size = 8
    const image = Float32Array.from(randomImage(size, createRandom(4)))
    const result = crossCorrelation2d(image, image, size)
    expect(argMax(result)).toBe((size / 2) * size + size / 2)
  })
})
