/**
 * Everything that decides how a preview looks, its defaults, and a canonical key: the options
 * after defaults, with settings that do not apply dropped, as JSON with sorted keys. Two option
 * objects that draw the same image give the same key, so it can name cached tiles.
 */
import { isColormapName, type ColormapName } from './colormaps'
import { DEFAULT_CONTRAST_PERCENTILE, type ContrastSetting } from './contrast'
import {
  resolveGaussianOptions,
  type GaussianOptions,
  type ResolvedGaussianOptions,
} from './gaussian-options'
import type { RenderFilter } from './render-view'

export type RenderMethod = 'histogram' | 'gaussian'
/** Density through a colormap; hue from mean z or mean frame; or channels 0 and 1 overlaid. */
export type ColourBy = 'density' | 'z' | 'frame' | 'channels'

export interface RenderOptions {
  /** Default 'histogram'. */
  method?: RenderMethod
  /** Used when method is 'gaussian'; its filter is ignored in favour of `filter`. */
  gaussian?: Omit<GaussianOptions, 'filter'>
  filter?: RenderFilter
  /** Default 'density'. */
  colourBy?: ColourBy
  /** Default 'inferno' for density, 'viridis' for z and frame; unused for channels. */
  colormap?: ColormapName
  /** Default auto at the 99.5th percentile of positive pixels. */
  contrast?: ContrastSetting
  /** Default 1. */
  gamma?: number
  /**
   * z (nm) or frame range at the colormap's ends; default the column's range over the table
   * passed (tiles should pass the whole table's range so their colours agree).
   */
  valueRange?: { min: number; max: number }
  /** Channel numbers overlaid (first amber, second azure); default [0, 1]. */
  channels?: [number, number]
}

export interface ResolvedRenderOptions {
  method: RenderMethod
  gaussian: ResolvedGaussianOptions | null
  filter: RenderFilter
  colourBy: ColourBy
  colormap: ColormapName | null
  contrast: ContrastSetting
  gamma: number
  valueRange: { min: number; max: number } | null
  channels: [number, number] | null
}

const positive = (v: number | undefined): v is number => v !== undefined && v > 0 && v < Infinity

export function resolveRenderOptions(options: RenderOptions = {}): ResolvedRenderOptions {
  const method = options.method === 'gaussian' ? 'gaussian' : 'histogram'
  const colourBy = options.colourBy ?? 'density'
  const byValue = colourBy === 'z' || colourBy === 'frame'
  const range = options.valueRange
  return {
    method,
    gaussian: method === 'gaussian' ? resolveGaussianOptions(options.gaussian) : null,
    filter: resolveFilter(options.filter ?? {}),
    colourBy,
    colormap:
      colourBy === 'channels'
        ? null
        : isColormapName(options.colormap)
          ? options.colormap
          : byValue
            ? 'viridis'
            : 'inferno',
    contrast: resolveContrastSetting(options.contrast),
    gamma: positive(options.gamma) ? options.gamma : 1,
    valueRange:
      byValue && range && Number.isFinite(range.min) && Number.isFinite(range.max)
        ? { min: range.min, max: range.max }
        : null,
    channels: colourBy === 'channels' ? (options.channels ?? [0, 1]) : null,
  }
}

function resolveFilter(f: RenderFilter): RenderFilter {
  const out: RenderFilter = {}
  if (f.frameMin !== undefined) out.frameMin = f.frameMin
  if (f.frameMax !== undefined) out.frameMax = f.frameMax
  if (f.maxUncertaintyNm !== undefined) out.maxUncertaintyNm = f.maxUncertaintyNm
  if (f.channel !== undefined) out.channel = f.channel
  return out
}

function resolveContrastSetting(c: ContrastSetting | undefined): ContrastSetting {
  if (c?.mode === 'manual') return { mode: 'manual', low: c.low, high: c.high }
  const p = c?.percentile
  return {
    mode: 'auto',
    percentile: p !== undefined && p >= 0 && p <= 100 ? p : DEFAULT_CONTRAST_PERCENTILE,
  }
}

/** The canonical key of the options after defaults (stable JSON, keys sorted). */
export function renderOptionsKey(options: RenderOptions = {}): string {
  return stableJson(resolveRenderOptions(options))
}

function stableJson(value: unknown): string {
  if (Array.isArray(value)) return `[${value.map(stableJson).join(',')}]`
  if (value !== null && typeof value === 'object') {
    const entries = Object.entries(value)
      .filter(([, v]) => v !== undefined)
      .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0))
    return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${stableJson(v)}`).join(',')}}`
  }
  return JSON.stringify(value) ?? 'null'
}

/**
 * The columns a render with these options reads (beside x and y), so a caller that fetches rows
 * (a tile thread) fetches no more: a plain density tile needs positions only.
 */
export function columnsDrawn(
  options: RenderOptions = {},
): Set<'frame' | 'uncertainty' | 'z' | 'channel'> {
  const resolved = resolveRenderOptions(options)
  const { filter, colourBy } = resolved
  const drawn = new Set<'frame' | 'uncertainty' | 'z' | 'channel'>()
  if (filter.frameMin !== undefined || filter.frameMax !== undefined || colourBy === 'frame')
    drawn.add('frame')
  // Gaussian kernels take each row's own precision; a precision filter needs it too.
  if (resolved.gaussian !== null || filter.maxUncertaintyNm !== undefined) drawn.add('uncertainty')
  if (colourBy === 'z') drawn.add('z')
  if (filter.channel !== undefined || colourBy === 'channels') drawn.add('channel')
  return drawn
}
