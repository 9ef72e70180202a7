/**
 * Cosine edge taper over the outer 1/8 of each side of a size×size image (Nieuwenhuizen et al.
 * 2013 taper their renders the same way), so the image edges do not add a cross of spurious high
 * frequencies. The window is separable, w(x)·w(y), with w rising as sin² over the edge band.
 */
export function taperWeights(size: number): Float64Array {
  const band = Math.max(1, Math.floor(size / 8))
  const weights = new Float64Array(size).fill(1)
  for (let i = 0; i < band; i++) {
    const w = Math.sin((Math.PI / 2) * ((i + 0.5) / band)) ** 2
    weights[i] = w
    weights[size - 1 - i] = w
  }
  return weights
}

export interface TaperedCounts {
  /** Σ count·w² of each half: the taper-weighted number of localizations. */
  a: number
  b: number
}

/**
 * Multiplies both halves (re = A, im = B) by the window in place. Only the edge bands are touched:
 * the interior weight is 1. Returns the taper-weighted counts, given the untapered totals.
 */
export function applyEdgeTaper(
  re: Float32Array,
  im: Float32Array,
  size: number,
  totals: TaperedCounts,
): TaperedCounts {
  const weights = taperWeights(size)
  const band = Math.max(1, Math.floor(size / 8))
  let lostA = 0
  let lostB = 0
  for (let row = 0; row < size; row++) {
    const rowWeight = weights[row]!
    const edgeRow = row < band || row >= size - band
    const base = row * size
    for (let column = 0; column < size; column++) {
      if (!edgeRow && column === band) column = size - band
      const w = rowWeight * weights[column]!
      const countA = re[base + column]!
      const countB = im[base + column]!
      lostA += countA * (1 - w * w)
      lostB += countB * (1 - w * w)
      re[base + column] = countA * w
      im[base + column] = countB * w
    }
  }
  return { a: totals.a - lostA, b: totals.b - lostB }
}
