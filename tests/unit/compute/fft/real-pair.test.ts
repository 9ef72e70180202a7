// @vitest-environment node
import { describe, expect, it } from 'vitest'
import { mirrorIndex, splitPairSpectra, transformRealPair } from '../../../../server/compute/fft'
import { createRandom } from '../../../fixtures/spot-simulation'
import { maxAbsDifference, naiveDft2d, randomImage } from './naive-dft'

describe('two real images through one complex FFT', () => {
  // Source: the DFT of each real image computed separately by the naive definition.
  it.each([8, 16])('recovers both spectra at %i×%i', (size) => {
    const random = createRandom(40 + size)
    const a = randomImage(size, random)
    const b = randomImage(size, random)
    const zeros = new Float64Array(size * size)
    const expectedA = naiveDft2d(a, zeros, size)
    const expectedB = naiveDft2d(b, zeros, size)
    const split = splitPairSpectra(transformRealPair(a, b, size))
    expect(maxAbsDifference(split.aRe, expectedA.re)).toBeLessThan(1e-9)
    expect(maxAbsDifference(split.aIm, expectedA.im)).toBeLessThan(1e-9)
    expect(maxAbsDifference(split.bRe, expectedB.re)).toBeLessThan(1e-9)
    expect(maxAbsDifference(split.bIm, expectedB.im)).toBeLessThan(1e-9)
  })

  // Source: definition of −k modulo size on each axis.
  it('finds the mirrored frequency', () => {
    const size = 8
    expect(mirrorIndex(0, size)).toBe(0)
    expect(mirrorIndex(1, size)).toBe(7)
    expect(mirrorIndex(size + 3, size)).toBe(7 * size + 5)
    expect(mirrorIndex(4 * size + 4, size)).toBe(4 * size + 4)
  })
})
