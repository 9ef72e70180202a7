/**
 * Ring sums of FRC from the packed spectrum Z = FFT(A + i·B) of the two real half images, rings one
 * frequency pixel wide: ring k holds the frequencies (u, v) with round(√(u² + v²)) = k, k = 0 … L/2
 * (up to Nyquist; the corners beyond are left out). With W = Z(−k) (see fft/real-pair.ts):
 *   Re A·conj B = Im(Z·W)/2,   |A|² = (|Z|² + |W|²)/4 + Re(Z·W)/2,   |B|² = … − Re(Z·W)/2.
 * All three are the same at k and −k, so only rows 0 … L/2 are visited and the rows strictly
 * between count twice (rows 0 and L/2 are their own mirrors and are visited whole).
 */
export interface RingSums {
  /** Σ Re A·conj B over each ring. */
  numerator: Float64Array
  powerA: Float64Array
  powerB: Float64Array
  /** Frequency pixels in each ring (whole plane). */
  pixels: Float64Array
}

interface RingIndex {
  size: number
  /** Ring of each pixel of rows 0 … L/2; ring L/2 + 1 collects the corners beyond Nyquist. */
  ring: Uint16Array
  pixels: Float64Array
}

let cachedIndex: RingIndex | undefined

/** Ring of every pixel of the upper half plane, computed once per size and kept for the next call. */
function ringIndexFor(size: number): RingIndex {
  if (cachedIndex?.size === size) return cachedIndex
  const half = size / 2
  const ring = new Uint16Array((half + 1) * size)
  const pixels = new Float64Array(half + 2)
  for (let row = 0; row <= half; row++) {
    const rowWeight = row === 0 || row === half ? 1 : 2
    for (let column = 0; column < size; column++) {
      const u = column < half ? column : column - size
      const k = Math.min(Math.round(Math.sqrt(row * row + u * u)), half + 1)
      ring[row * size + column] = k
      pixels[k]! += rowWeight
    }
  }
  cachedIndex = { size, ring, pixels }
  return cachedIndex
}

export function ringSums(re: Float32Array, im: Float32Array, size: number): RingSums {
  const { ring, pixels } = ringIndexFor(size)
  const half = size / 2
  const numerator = new Float64Array(half + 2)
  const powerA = new Float64Array(half + 2)
  const powerB = new Float64Array(half + 2)
  for (let row = 0; row <= half; row++) {
    const weight = row === 0 || row === half ? 1 : 2
    const base = row * size
    const mirrorBase = ((size - row) & (size - 1)) * size
    for (let column = 0; column < size; column++) {
      const mirror = mirrorBase + (column === 0 ? 0 : size - column)
      const zr = re[base + column]!
      const zi = im[base + column]!
      const wr = re[mirror]!
      const wi = im[mirror]!
      const k = ring[base + column]!
      const sum = (zr * zr + zi * zi + wr * wr + wi * wi) / 4
      const difference = (zr * wr - zi * wi) / 2
      numerator[k]! += (weight * (zr * wi + zi * wr)) / 2
      powerA[k]! += weight * (sum + difference)
      powerB[k]! += weight * (sum - difference)
    }
  }
  const rings = half + 1
  return {
    numerator: numerator.subarray(0, rings),
    powerA: powerA.subarray(0, rings),
    powerB: powerB.subarray(0, rings),
    pixels: pixels.slice(0, rings),
  }
}
