/**
 * Histogram renders: localizations counted per pixel (DOMAIN §1.11: counts per bin), and the same
 * with a per-pixel sum of one value column (z or frame) for colouring by that value.
 */
import type { Localizations, NumericColumn } from '../localizations.types'
import { addCounts, addCountsAndSums, indexBuffer, INDEX_CHUNK, valueBuffer } from './banded-counts'
import {
  blankImage,
  isDrawableView,
  RowFilter,
  type RenderFilter,
  type RenderView,
} from './render-view'

/**
 * Localizations per pixel; rows with a non-finite position or outside the view are skipped.
 * `into`, when it has the view's size, is cleared and drawn into instead of a new image.
 */
export function renderHistogram(
  locs: Localizations,
  view: RenderView,
  filter?: RenderFilter,
  into?: Float32Array,
): Float32Array {
  const counts = into?.length === view.width * view.height ? into.fill(0) : blankImage(view)
  if (counts.length > 0) accumulateCounts(locs, view, new RowFilter(locs, filter), counts)
  return counts
}

/** A density image and, per pixel, the mean of a value column over its localizations. */
export interface ValueImage {
  /** Localizations per pixel (counts, or Gaussian weight). */
  density: Float32Array
  /** NaN where the pixel holds nothing. */
  mean: Float32Array
}

/**
 * Counts and the per-pixel mean of `value` (e.g. z or frame). Rows whose value is not finite are
 * left out of both images, so brightness and hue describe the same localizations.
 */
export function renderValueHistogram(
  locs: Localizations,
  view: RenderView,
  value: NumericColumn,
  filter?: RenderFilter,
): ValueImage {
  const counts = blankImage(view)
  // Float32 sums (then the means, in place) keep a whole-field render's memory at two images;
  // their rounding, ~1e-7 of the sum, is far below a colormap step.
  const mean = blankImage(view)
  if (counts.length > 0) {
    accumulateValues(locs, view, new RowFilter(locs, filter), counts, value, mean)
  }
  for (let p = 0; p < counts.length; p++) mean[p] = counts[p]! > 0 ? mean[p]! / counts[p]! : NaN
  return { density: counts, mean }
}

/** Counts in chunks: pixel indices of the rows drawn first, then added (banded when large). */
function accumulateCounts(
  locs: Localizations,
  view: RenderView,
  rows: RowFilter,
  counts: Float32Array,
) {
  if (!isDrawableView(view)) return
  const indices = indexBuffer()
  const n = Math.min(locs.count, locs.x.length, locs.y.length)
  for (let start = 0; start < n; start += INDEX_CHUNK) {
    const end = Math.min(n, start + INDEX_CHUNK)
    const length = pixelIndices(locs, view, rows, start, end, indices, null, null)
    addCounts(counts, indices, length)
  }
}

/** Counts and value sums, the same way. */
function accumulateValues(
  locs: Localizations,
  view: RenderView,
  rows: RowFilter,
  counts: Float32Array,
  value: NumericColumn,
  sums: Float32Array,
) {
  if (!isDrawableView(view)) return
  const indices = indexBuffer()
  const values = valueBuffer()
  const n = Math.min(locs.count, locs.x.length, locs.y.length, value.length)
  for (let start = 0; start < n; start += INDEX_CHUNK) {
    const end = Math.min(n, start + INDEX_CHUNK)
    const length = pixelIndices(locs, view, rows, start, end, indices, value, values)
    addCountsAndSums(counts, sums, indices, values, length)
  }
}

/**
 * Writes the pixel index of each drawn row in [start, end) to `out` (and its value to
 * `valuesOut`, leaving out rows whose value is not finite); returns how many.
 */
function pixelIndices(
  locs: Localizations,
  view: RenderView,
  rows: RowFilter,
  start: number,
  end: number,
  out: Int32Array,
  value: NumericColumn | null,
  valuesOut: Float64Array | null,
): number {
  const { xMinNm, yMinNm, pixelNm, width, height } = view
  const { x, y } = locs
  const filtering = rows.active
  let length = 0
  for (let i = start; i < end; i++) {
    // Comparisons written so NaN positions fail them; truncation equals floor once ≥ 0.
    const fx = (x[i]! - xMinNm) / pixelNm
    if (!(fx >= 0 && fx < width)) continue
    const fy = (y[i]! - yMinNm) / pixelNm
    if (!(fy >= 0 && fy < height)) continue
    if (filtering && !rows.accepts(i)) continue
    if (value !== null && valuesOut !== null) {
      const v = value[i]!
      if (!(v > -Infinity && v < Infinity)) continue
      valuesOut[length] = v
    }
    out[length++] = (fy | 0) * width + (fx | 0)
  }
  return length
}
