import { fft2d, mirrorIndex } from '../fft'
import type { Localizations } from '../localizations.types'
import type { SegmentPlan } from './segments'
import type { DenseDrift } from './trajectory'

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
 * correlation then never wraps a shift within reach onto another), centred on the field. When that would exceed
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
  // Half the shift range as a margin on each side keeps drift-corrected positions inside the image.
  return { size, pixelNm, originX: plan.minX - maxShiftNm / 2, originY: plan.minY - maxShiftNm / 2 }
}

/**
 * Renders the given segments, each position less the drift of its frame when `correction` is given,
 * and Fourier-transforms them two at a time (one complex FFT per pair of segments).
 */
export function segmentSpectra(
  locs: Localizations,
  plan: SegmentPlan,
  grid: RenderGrid,
  segments: number[],
  correction: DenseDrift | null,
): Spectrum[] {
  const cells = grid.size * grid.size
  const spectra = segments.map(() => ({ re: new Float32Array(cells), im: new Float32Array(cells) }))
  renderHistograms(locs, plan, grid, { segments, spectra, correction })
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
  target: { segments: number[]; spectra: Spectrum[]; correction: DenseDrift | null },
) {
  const slotOfSegment = new Int32Array(plan.rows.length).fill(-1)
  target.segments.forEach((segment, slot) => (slotOfSegment[segment] = slot))
  const { size, pixelNm, originX, originY } = grid
  const correction = target.correction
  for (let i = 0; i < locs.count; i++) {
    const segment = plan.segmentOf[i] ?? -1
    const image = segment >= 0 ? target.spectra[slotOfSegment[segment] ?? -1]?.re : undefined
    if (!image) continue
    let x = (locs.x[i] ?? 0) - originX
    let y = (locs.y[i] ?? 0) - originY
    if (correction) {
      const k = Math.round((locs.frame[i] ?? 0) - correction.firstFrame)
      x -= correction.x[k] ?? 0
      y -= correction.y[k] ?? 0
    }
    // Corrected positions may leave the field by the drift; the padding holds them, the clamp is a guard.
    const column = Math.max(0, Math.min(size - 1, Math.floor(x / pixelNm)))
    const row = Math.max(0, Math.min(size - 1, Math.floor(y / pixelNm)))
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
