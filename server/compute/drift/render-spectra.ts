import { fft2d, mirrorIndex } from '../fft'
import type { Localizations } from '../localizations.types'
import type { SegmentPlan } from './segments'

/** The square power-of-two image every segment is rendered on. */
export interface RenderGrid {
  size: number
  pixelNm: number
  originX: number
  originY: number
}

/** Spectrum of one segment's 2D histogram, stored in single precision to halve memory. */
export interface Spectrum {
  re: Float32Array
  im: Float32Array
}

/**
 * Smallest power-of-two image holding the field plus the largest shift searched (circular
 * correlation then never wraps a shift within reach onto another). When that would exceed
 * maxImageSize, the pixel grows instead so the whole field still fits.
 */
export function chooseGrid(
  plan: SegmentPlan,
  renderPixelNm: number,
  maxShiftNm: number,
  maxImageSize: number,
): RenderGrid {
  const extent = Math.max(plan.maxX - plan.minX, plan.maxY - plan.minY) + maxShiftNm
  let size = 16
  while (size < extent / renderPixelNm && size < maxImageSize) size *= 2
  const pixelNm = Math.max(renderPixelNm, extent / size)
  return { size, pixelNm, originX: plan.minX, originY: plan.minY }
}

/** Renders the given segments and Fourier-transforms them two at a time (one complex FFT per pair). */
export function segmentSpectra(
  locs: Localizations,
  plan: SegmentPlan,
  grid: RenderGrid,
  segments: number[],
): Spectrum[] {
  const cells = grid.size * grid.size
  const spectra = segments.map(() => ({ re: new Float32Array(cells), im: new Float32Array(cells) }))
  renderHistograms(locs, plan, grid, segments, spectra)
  const re = new Float64Array(cells)
  const im = new Float64Array(cells)
  for (let k = 0; k < spectra.length; k += 2) {
    const first = spectra[k]
    const second = spectra[k + 1]
    if (!first) break
    re.set(first.re)
    if (second) im.set(second.re)
    else im.fill(0)
    fft2d(re, im, grid.size)
    splitSpectra(re, im, grid.size, first, second)
  }
  return spectra
}

/** Counts each segment's localizations per pixel into its spectrum's real part (the image). */
function renderHistograms(
  locs: Localizations,
  plan: SegmentPlan,
  grid: RenderGrid,
  segments: number[],
  spectra: Spectrum[],
) {
  const slotOfSegment = new Int32Array(plan.rows.length).fill(-1)
  segments.forEach((segment, slot) => (slotOfSegment[segment] = slot))
  const { size, pixelNm, originX, originY } = grid
  for (let i = 0; i < locs.count; i++) {
    const segment = plan.segmentOf[i] ?? -1
    const image = segment >= 0 ? spectra[slotOfSegment[segment] ?? -1]?.re : undefined
    if (!image) continue
    const column = Math.min(size - 1, Math.floor(((locs.x[i] ?? 0) - originX) / pixelNm))
    const row = Math.min(size - 1, Math.floor(((locs.y[i] ?? 0) - originY) / pixelNm))
    image[row * size + column] = (image[row * size + column] ?? 0) + 1
  }
}

/** Spectra of two real images from Z = FFT(a + i·b): A = (Z(k) + conj Z(−k))/2, B = (Z(k) − conj Z(−k))/2i. */
function splitSpectra(
  re: Float64Array,
  im: Float64Array,
  size: number,
  first: Spectrum,
  second: Spectrum | undefined,
) {
  const cells = size * size
  for (let k = 0; k < cells; k++) {
    const m = mirrorIndex(k, size)
    const zr = re[k] ?? 0
    const zi = im[k] ?? 0
    const wr = re[m] ?? 0
    const wi = im[m] ?? 0
    first.re[k] = (zr + wr) / 2
    first.im[k] = (zi - wi) / 2
    if (!second) continue
    second.re[k] = (zi + wi) / 2
    second.im[k] = (wr - zr) / 2
  }
}
