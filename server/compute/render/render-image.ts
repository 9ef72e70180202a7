/** One call from localizations to an RGB image, as the tile endpoint needs it. */
import type { Localizations, NumericColumn } from '../localizations.types'
import { colourize, colourizeByValue, overlayChannels } from './colourize'
import { renderGaussian, renderGaussianValue } from './gaussian'
import { renderHistogram, renderValueHistogram, type ValueImage } from './histogram'
import {
  resolveRenderOptions,
  type RenderOptions,
  type ResolvedRenderOptions,
} from './render-options'
import type { RenderFilter, RenderView } from './render-view'

export interface RenderedImage {
  /** width·height·3 bytes, row-major, row 0 at the smallest y. */
  rgb: Uint8Array
  width: number
  height: number
  options: ResolvedRenderOptions
  /** Set when the options could not be followed as asked (what was drawn instead). */
  reason?: string
}

export function renderImage(
  locs: Localizations,
  view: RenderView,
  options: RenderOptions = {},
): RenderedImage {
  const resolved = resolveRenderOptions(options)
  const { width, height } = view
  const done = (rgb: Uint8Array, reason?: string): RenderedImage =>
    reason === undefined
      ? { rgb, width, height, options: resolved }
      : { rgb, width, height, options: resolved, reason }
  const colour = { colormap: resolved.colormap ?? undefined, gamma: resolved.gamma }
  if (resolved.colourBy === 'channels') {
    const [a, b] = resolved.channels ?? [0, 1]
    const first = density(locs, view, resolved, { ...resolved.filter, channel: a })
    const second = density(locs, view, resolved, { ...resolved.filter, channel: b })
    const reason = locs.channel
      ? undefined
      : 'the table has no channel column: all rows are channel 0'
    return done(
      overlayChannels(first, second, { contrast: resolved.contrast, gamma: resolved.gamma }),
      reason,
    )
  }
  if (resolved.colourBy === 'density') {
    return done(
      colourize(density(locs, view, resolved, resolved.filter), {
        ...colour,
        contrast: resolved.contrast,
      }),
    )
  }
  const column = resolved.colourBy === 'z' ? locs.z : locs.frame
  if (!column) {
    const image = density(locs, view, resolved, resolved.filter)
    return done(
      colourize(image, { ...colour, contrast: resolved.contrast }),
      'the table has no z column: coloured by density',
    )
  }
  const valued = valueImage(locs, view, resolved, column)
  const valueRange = resolved.valueRange ?? finiteRange(column, locs.count)
  const rgb = colourizeByValue(valued.density, valued.mean, {
    ...colour,
    contrast: resolved.contrast,
    valueRange,
  })
  return done(rgb)
}

function density(
  locs: Localizations,
  view: RenderView,
  resolved: ResolvedRenderOptions,
  filter: RenderFilter,
): Float32Array {
  if (resolved.gaussian === null) return renderHistogram(locs, view, filter)
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
    if (v < min) min = v
    if (v > max) max = v
  }
  return min <= max ? { min, max } : { min: 0, max: 0 }
}
