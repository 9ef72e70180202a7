import { subPixelPeak } from './peak'
import type { RenderGrid, Spectrum } from './render-spectra'
import { WindowInverse } from './window-inverse'

/** Measured shift of segment j relative to segment i (r_ij = d_j − d_i), nm; NaN when not found. */
export interface PairShifts {
  first: Uint16Array
  second: Uint16Array
  dx: Float64Array
  dy: Float64Array
}

/**
 * Cross-correlates every pair of segments (i < j) from their spectra: c = IFFT(conj(A_i)·A_j·G),
 * where G is a Gaussian smoothing of `smoothingPixels` SD (it widens the correlation peak over a few
 * pixels so the 3-point fit has something to fit) times (−1)^(u+v), which puts zero shift at the
 * image centre; only the shifts within reach are transformed back. Two pairs share one inverse FFT: both correlations are real, so the transform of
 * P₁ + i·P₂ returns c₁ in the real and c₂ in the imaginary part.
 */
export function correlateAllPairs(
  spectra: Spectrum[],
  grid: RenderGrid,
  maxShiftNm: number,
  smoothingPixels: number,
): PairShifts {
  const count = spectra.length
  const pairTotal = (count * (count - 1)) / 2
  const pairs: PairShifts = {
    first: new Uint16Array(pairTotal),
    second: new Uint16Array(pairTotal),
    dx: new Float64Array(pairTotal),
    dy: new Float64Array(pairTotal),
  }
  let p = 0
  for (let i = 0; i < count; i++) {
    for (let j = i + 1; j < count; j++, p++) {
      pairs.first[p] = i
      pairs.second[p] = j
    }
  }
  const { size } = grid
  const filter = centredGaussian(size, smoothingPixels)
  const re = new Float64Array(size * size)
  const im = new Float64Array(size * size)
  // One pixel beyond the reach so that a peak at the reach still has neighbours for the fit.
  const reachPixels = Math.min(size / 2 - 2, Math.ceil(maxShiftNm / grid.pixelNm))
  const inverse = new WindowInverse(size, reachPixels + 1)
  for (let p = 0; p < pairTotal; p += 2) {
    const hasSecond = p + 1 < pairTotal
    writePairProducts(spectra, pairs, p, hasSecond, filter, re, im)
    inverse.run(re, im)
    storeShift(pairs, p, subPixelPeak(inverse.re, inverse.width, reachPixels), grid.pixelNm)
    if (hasSecond) {
      storeShift(pairs, p + 1, subPixelPeak(inverse.im, inverse.width, reachPixels), grid.pixelNm)
    }
  }
  return pairs
}

function storeShift(pairs: PairShifts, p: number, peak: { x: number; y: number }, pixelNm: number) {
  pairs.dx[p] = peak.x * pixelNm
  pairs.dy[p] = peak.y * pixelNm
}

/** re + i·im = P₁ + i·P₂ with P = conj(A_i)·A_j·filter for pairs p and p + 1. */
function writePairProducts(
  spectra: Spectrum[],
  pairs: PairShifts,
  p: number,
  hasSecond: boolean,
  filter: Float64Array,
  re: Float64Array,
  im: Float64Array,
) {
  const a1 = spectra[pairs.first[p] ?? 0]
  const b1 = spectra[pairs.second[p] ?? 0]
  const a2 = hasSecond ? spectra[pairs.first[p + 1] ?? 0] : undefined
  const b2 = hasSecond ? spectra[pairs.second[p + 1] ?? 0] : undefined
  if (!a1 || !b1) return
  const [a1re, a1im, b1re, b1im] = [a1.re, a1.im, b1.re, b1.im]
  const empty = new Float32Array(0)
  const [a2re, a2im, b2re, b2im] =
    a2 && b2 ? [a2.re, a2.im, b2.re, b2.im] : [empty, empty, empty, empty]
  const second = a2re.length > 0
  // Plain scalar loads: destructuring here would allocate per element.
  for (let k = 0; k < re.length; k++) {
    const g = filter[k] ?? 0
    const ar = a1re[k] ?? 0
    const ai = a1im[k] ?? 0
    const br = b1re[k] ?? 0
    const bi = b1im[k] ?? 0
    const p1r = g * (ar * br + ai * bi)
    const p1i = g * (ar * bi - ai * br)
    let p2r = 0
    let p2i = 0
    if (second) {
      const cr = a2re[k] ?? 0
      const ci = a2im[k] ?? 0
      const dr = b2re[k] ?? 0
      const di = b2im[k] ?? 0
      p2r = g * (cr * dr + ci * di)
      p2i = g * (cr * di - ci * dr)
    }
    re[k] = p1r - p2i
    im[k] = p1i + p2r
  }
}

/** exp(−2π²σ²(f_u² + f_v²)) · (−1)^(u+v), frequencies in cycles per pixel, σ in pixels. */
function centredGaussian(size: number, sigmaPixels: number): Float64Array {
  const axis = new Float64Array(size)
  for (let u = 0; u < size; u++) {
    const f = (u <= size / 2 ? u : u - size) / size
    axis[u] =
      Math.exp(-2 * Math.PI * Math.PI * sigmaPixels * sigmaPixels * f * f) * (u % 2 ? -1 : 1)
  }
  const filter = new Float64Array(size * size)
  for (let v = 0; v < size; v++) {
    for (let u = 0; u < size; u++) filter[v * size + u] = (axis[v] ?? 0) * (axis[u] ?? 0)
  }
  return filter
}
