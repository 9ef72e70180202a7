/** One call from localizations to an RGB image, as the tile endpoint needs it. */
import type { Localizations, NumericColumn } from '../localizations.types'
import { colourIndices, colourize, colourizeByValue, overlayChannels } from './colourize'
import { renderGaussian, renderGaussianValue } from './gaussian'
import { renderHistogram, renderValueHistogram, type ValueImage } from './histogram'
import {
  resolveRenderOptions,
  type RenderOptions,
  type ResolvedRenderOptions,
} from './render-options'
import { isDrawableView, type RenderFilter, type RenderView } from './render-view'

export interface RenderedImage {
  /** width·height·3 bytes, row-major, row 0 at the smallest y. */
  rgb: Uint8Array
  width: number
  height: number
  options: ResolvedRenderOptions
  /** Set when the options could not be followed as asked (what was drawn instead). */
  reason?: string
}

/**
 * Buffers a caller drawing many images of one size (a tile thread) lends to the density path, so
 * each image does not allocate (and first-touch) fresh memory. The result's rgb is then `rgb`:
 * it is valid until the next call that lends the same scratch.
 */
export interface ImageScratch {
  density: Float32Array
  rgb: Uint8Array
}

export function renderImage(
  locs: Localizations,
  view: RenderView,
  options: RenderOptions = {},
  scratch?: ImageScratch,
): RenderedImage {
  const resolved = resolveRenderOptions(options)
  if (!isDrawableView(view)) {
    const reason = 'the view has no usable pixel size, origin or dimensions'
    return { rgb: new Uint8Array(0), width: 0, height: 0, options: resolved, reason }
  }
  const { rgb, reason } = colouredImage(locs, view, resolved, scratch)
  const image: RenderedImage = { rgb, width: view.width, height: view.height, options: resolved }
  if (reason !== undefined) image.reason = reason
  return image
}

/** A density image as palette indices and the colormap as palette (see colourIndices). */
export interface IndexedImage {
  indices: Uint8Array
  palette: Uint8Array
  width: number
  height: number
}

/** Whether the options colour plain density through a colormap, which a palette image can carry. */
export function coloursDensity(options: RenderOptions): boolean {
  return (options.colourBy ?? 'density') === 'density'
}

/**
 * renderImage for options that colour density (see coloursDensity), as a palette image: the same
 * pixels once the palette is applied. The indices are written into the scratch's rgb when lent.
 */
export function renderIndexedImage(
  locs: Localizations,
  view: RenderView,
  options: RenderOptions = {},
  scratch?: ImageScratch,
): IndexedImage {
  const resolved = resolveRenderOptions(options)
  const counts = density(locs, view, resolved, resolved.filter, scratch?.density)
  return indexedCounts(counts, view, resolved, scratch)
}

/** Counts already binned for the view (an overview's blocks), coloured as density, as a palette image. */
export function renderIndexedCounts(
  counts: Float32Array,
  view: RenderView,
  options: RenderOptions = {},
  scratch?: ImageScratch,
): IndexedImage {
  return indexedCounts(counts, view, resolveRenderOptions(options), scratch)
}

function indexedCounts(
  counts: Float32Array,
  view: RenderView,
  resolved: ResolvedRenderOptions,
  scratch?: ImageScratch,
): IndexedImage {
  const { contrast, gamma } = resolved
  const colour = { colormap: resolved.colormap ?? undefined, contrast, gamma }
  const { indices, palette } = colourIndices(counts, colour, scratch?.rgb)
  return { indices, palette, width: view.width, height: view.height }
}

function colouredImage(
  locs: Localizations,
  view: RenderView,
  resolved: ResolvedRenderOptions,
  scratch?: ImageScratch,
): { rgb: Uint8Array; reason?: string } {
  const { contrast, gamma } = resolved
  const colour = { colormap: resolved.colormap ?? undefined, contrast, gamma }
  if (resolved.colourBy === 'channels') {
    const [a, b] = resolved.channels ?? [0, 1]
    const first = density(locs, view, resolved, { ...resolved.filter, channel: a })
    const second = density(locs, view, resolved, { ...resolved.filter, channel: b })
    const rgb = overlayChannels(first, second, { contrast, gamma })
    if (locs.channel) return { rgb }
    return { rgb, reason: 'the table has no channel column: all rows are channel 0' }
  }
  const column = resolved.colourBy === 'z' ? locs.z : locs.frame
  if (resolved.colourBy === 'density' || !column) {
    const counts = density(locs, view, resolved, resolved.filter, scratch?.density)
    const rgb = colourize(counts, colour, scratch?.rgb)
    if (column || resolved.colourBy === 'density') return { rgb }
    return { rgb, reason: 'the table has no z column: coloured by density' }
  }
  const valued = valueImage(locs, view, resolved, column)
  const valueRange = resolved.valueRange ?? finiteRange(column, locs.count)
  return { rgb: colourizeByValue(valued.density, valued.mean, { ...colour, valueRange }) }
}

function density(
  locs: Localizations,
  view: RenderView,
  resolved: ResolvedRenderOptions,
  filter: RenderFilter,
  into?: Float32Array,
): Float32Array {
  if (resolved.gaussian === null) return renderHistogram(locs, view, filter, into)
  return renderGaussian(locs, view, { ...resolved.gaussian, filter })
}

function valueImage(
  locs: Localizations,
  view: RenderView,
  resolved: ResolvedRenderOptions,
  column: NumericColumn,
): ValueImage {
  if (resolved.gaussian === null) return renderValueHistogram(locs, view, column, resolved.filter)
  return renderGaussianValue(locs, view, column, { ...resolved.gaussian, filter: resolved.filter })
}

/** Smallest and largest finite value of a column ({0, 0} when there is none). */
export function finiteRange(column: NumericColumn, count: number): { min: number; max: number } {
  let min = Infinity
  let max = -Infinity
  const n = Math.min(count, column.length)
  for (let i = 0; i < n; i++) {
    const v = column[i]!
    if (!(v > -Infinity && v < Infinity)) continue
    if (v < min) min = v
    if (v > max) max = v
  }
  return min <= max ? { min, max } : { min: 0, max: 0 }
}
