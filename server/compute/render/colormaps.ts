/**
 * Colormaps as 256-entry RGB tables, sampled once from d3-scale-chromatic's published
 * interpolators (viridis, magma, inferno: the matplotlib maps by van der Walt & Smith; cividis:
 * Nuñez, Anderton & Renslow 2018). Grayscale is a plain linear ramp from black to white.
 */
import {
  interpolateCividis,
  interpolateInferno,
  interpolateMagma,
  interpolateViridis,
} from 'd3-scale-chromatic'

export const COLORMAP_NAMES = ['viridis', 'magma', 'inferno', 'cividis', 'grayscale'] as const
export type ColormapName = (typeof COLORMAP_NAMES)[number]

export const COLORMAP_SIZE = 256

const interpolators: Record<Exclude<ColormapName, 'grayscale'>, (t: number) => string> = {
  viridis: interpolateViridis,
  magma: interpolateMagma,
  inferno: interpolateInferno,
  cividis: interpolateCividis,
}

const tables = new Map<ColormapName, Uint8Array>()

export function isColormapName(name: unknown): name is ColormapName {
  return typeof name === 'string' && (COLORMAP_NAMES as readonly string[]).includes(name)
}

/** RGB triplets, entry k at [3k, 3k+3) for t = k/255; built on first use, then shared. */
export function colormapTable(name: ColormapName): Uint8Array {
  let table = tables.get(name)
  if (!table) {
    table = buildTable(name)
    tables.set(name, table)
  }
  return table
}

function buildTable(name: ColormapName): Uint8Array {
  const table = new Uint8Array(COLORMAP_SIZE * 3)
  for (let k = 0; k < COLORMAP_SIZE; k++) {
    const t = k / (COLORMAP_SIZE - 1)
    const rgb = name === 'grayscale' ? [k, k, k] : parseColour(interpolators[name](t))
    table.set(rgb, 3 * k)
  }
  return table
}

/** d3's interpolators answer "#rrggbb" or "rgb(r, g, b)". */
export function parseColour(text: string): [number, number, number] {
  const hex = /^#([0-9a-f]{2})([0-9a-f]{2})([0-9a-f]{2})$/i.exec(text)
  if (hex) return [parseInt(hex[1]!, 16), parseInt(hex[2]!, 16), parseInt(hex[3]!, 16)]
  const rgb = /^rgb\((\d+),\s*(\d+),\s*(\d+)\)$/.exec(text)
  if (rgb) return [Number(rgb[1]), Number(rgb[2]), Number(rgb[3])]
  throw new Error(`Unexpected colour from the colormap package: ${text}`)
}
