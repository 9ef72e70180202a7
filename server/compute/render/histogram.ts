/**
 * Histogram renders: localizations counted per pixel (DOMAIN §1.11: counts per bin), and the same
 * with a per-pixel sum of one value column (z or frame) for colouring by that value.
 */
import type { Localizations, NumericColumn } from '../localizations.types'
import { addCounts, indexBuffer, INDEX_CHUNK } from './banded-counts'
import {
  blankImage,
  isDrawableView,
  RowFilter,
  type RenderFilter,
  type RenderView,
} from './render-view'

/** Localizations per pixel; rows with a non-finite position or outside the view are skipped. */
export function renderHistogram(
  locs: Localizations,
  view: RenderView,
  filter?: RenderFilter,
): Float32Array {
  const counts = blankImage(view)
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
  const sums = new Float64Array(counts.length)
  if (counts.length > 0)
    accumulateValues(locs, view, new RowFilter(locs, filter), counts, value, sums)
  const mean = new Float32Array(counts.length)
  for (let p = 0; p < counts.length; p++) mean[p] = counts[p]! > 0 ? sums[p]! / counts[p]! : NaN
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
    const length = pixelIndices(locs, view, rows, start, Math.min(n, start + INDEX_CHUNK), indices)
    addCounts(counts, indices, length)
  }
}

/** Writes the pixel index of each drawn row in [start, end) to `out`; returns how many. */
function pixelIndices(
  locs: Localizations,
  view: RenderView,
  rows: RowFilter,
  start: number,
  end: number,
  out: Int32Array,
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
    out[length++] = (fy | 0) * width + (fx | 0)
  }
  return length
}

/** Counts and value sums, one row at a time. */
function accumulateValues(
  locs: Localizations,
  view: RenderView,
  rows: RowFilter,
  counts: Float32Array,
  value: NumericColumn,
  sums: Float64Array,
) {
  if (!isDrawableView(view)) return
  const { xMinNm, yMinNm, pixelNm, width, height } = view
  const { x, y } = locs
  const n = Math.min(locs.count, x.length, y.length)
  for (let i = 0; i < n; i++) {
    const fx = (x[i]! - xMinNm) / pixelNm
    if (!(fx >= 0 && fx < width)) continue
    const fy = (y[i]! - yMinNm) / pixelNm
    if (!(fy >= 0 && fy < height)) continue
    if (rows.active && !rows.accepts(i)) continue
    const v = value[i]!
    if (!Number.isFinite(v)) continue
    const p = (fy | 0) * width + (fx | 0)
    sums[p] = sums[p]! + v
    counts[p] = counts[p]! + 1
  }
}
