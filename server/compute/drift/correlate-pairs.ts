import { fft2d } from '../fft'
import { subPixelPeak } from './peak'
import type { RenderGrid, Spectrum } from './render-spectra'

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
 * image centre. Two pairs share one inverse FFT: both correlations are real, so the transform of
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
  const reachPixels = Math.min(size / 2 - 2, Math.ceil(maxShiftNm / grid.pixelNm))
  for (let p = 0; p < pairTotal; p += 2) {
    const hasSecond = p + 1 < pairTotal
    writePairProducts(spectra, pairs, p, hasSecond, filter, re, im)
    fft2d(re, im, size, true)
    storeShift(pairs, p, subPixelPeak(re, size, reachPixels), grid.pixelNm)
    if (hasSecond) storeShift(pairs, p + 1, subPixelPeak(im, size, reachPixels), grid.pixelNm)
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
  for (let k = 0; k < re.length; k++) {
    const g = filter[k] ?? 0
    const [ar, ai, br, bi] = [a1.re[k] ?? 0, a1.im[k] ?? 0, b1.re[k] ?? 0, b1.im[k] ?? 0]
    const p1r = g * (ar * br + ai * bi)
    const p1i = g * (ar * bi - ai * br)
    let p2r = 0
    let p2i = 0
    if (a2 && b2) {
      const [cr, ci, dr, di] = [a2.re[k] ?? 0, a2.im[k] ?? 0, b2.re[k] ?? 0, b2.im[k] ?? 0]
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
