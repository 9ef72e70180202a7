/**
 * Density images to RGB (3 bytes per pixel, row-major): through a colormap, coloured by a value
 * (mean z or mean frame per pixel), or two channels overlaid in two fixed hues.
 */
import { colormapTable, type ColormapName } from './colormaps'
import { LevelMap, resolveContrast, type ContrastSetting } from './contrast'

export interface ColourOptions {
  /** Default 'inferno' (black background). */
  colormap?: ColormapName
  /** Default auto, 99.5th percentile of the positive pixels. */
  contrast?: ContrastSetting
  /** Exponent applied after contrast, default 1; below 1 lifts faint structure. */
  gamma?: number
}

export const COLOUR_DEFAULTS = { colormap: 'inferno', gamma: 1 } as const

/**
 * Through the colormap; into `into` when it has the image's size (3 bytes a pixel). The palette
 * image of `colourIndices`, expanded (tiles send that one as it is).
 */
export function colourize(
  image: Float32Array,
  options: ColourOptions = {},
  into?: Uint8Array,
): Uint8Array {
  const { indices, palette } = colourIndices(image, options)
  const rgb = into?.length === image.length * 3 ? into : new Uint8Array(image.length * 3)
  for (let p = 0; p < indices.length; p++) {
    const k = 3 * indices[p]!
    rgb[3 * p] = palette[k]!
    rgb[3 * p + 1] = palette[k + 1]!
    rgb[3 * p + 2] = palette[k + 2]!
  }
  return rgb
}

/**
 * The same colouring as palette indices (one byte a pixel) and the colormap as the palette:
 * pixel p is colour `palette[3·i…3·i+2]` with i = `indices[p]`.
 * Into `into` when it holds at least the image's pixels.
 */
export function colourIndices(
  image: Float32Array,
  options: ColourOptions = {},
  into?: Uint8Array,
): { indices: Uint8Array; palette: Uint8Array } {
  const palette = colormapTable(options.colormap ?? COLOUR_DEFAULTS.colormap)
  const levels = new LevelMap(resolveContrast(image, options.contrast), options.gamma)
  const indices =
    into && into.length >= image.length
      ? into.subarray(0, image.length)
      : new Uint8Array(image.length)
  // Empty pixels (most of a deep tile) reuse the level of 0, looked up once.
  const empty = levels.level(0)
  for (let p = 0; p < image.length; p++) {
    const v = image[p]!
    indices[p] = v === 0 ? empty : levels.level(v)
  }
  return { indices, palette }
}

export interface ValueColourOptions extends ColourOptions {
  /** Values mapped to the colormap's ends (e.g. z in nm, or frames); outside them clamped. */
  valueRange: { min: number; max: number }
}

/**
 * Hue from each pixel's mean value through the colormap, brightness from its density: the colour
 * is scaled by the contrast-mapped density. Use a map whose low end is not black (viridis,
 * cividis, the default here): with magma or inferno the smallest values would vanish.
 */
export function colourizeByValue(
  density: Float32Array,
  meanValue: Float32Array,
  options: ValueColourOptions,
): Uint8Array {
  const table = colormapTable(options.colormap ?? 'viridis')
  const levels = new LevelMap(resolveContrast(density, options.contrast), options.gamma)
  const { min, max } = options.valueRange
  const valueScale = max > min ? 255 / (max - min) : 0
  const rgb = new Uint8Array(density.length * 3)
  for (let p = 0; p < density.length; p++) {
    const brightness = levels.level(density[p]!) / 255
    const hue = (meanValue[p]! - min) * valueScale
    if (brightness === 0 || !(hue === hue)) continue
    const k = 3 * (hue <= 0 ? 0 : hue >= 255 ? 255 : (hue + 0.5) | 0)
    rgb[3 * p] = table[k]! * brightness + 0.5
    rgb[3 * p + 1] = table[k + 1]! * brightness + 0.5
    rgb[3 * p + 2] = table[k + 2]! * brightness + 0.5
  }
  return rgb
}

/**
 * Two channels' colours: amber and azure, a warm/cool pair told apart with the common forms of
 * colour blindness, chosen to add up to white where both channels are at full brightness.
 */
export const CHANNEL_COLOURS: readonly [readonly number[], readonly number[]] = [
  [255, 128, 0],
  [0, 127, 255],
]

export interface OverlayOptions {
  /** One setting for both channels, or one each; default auto per channel. */
  contrast?: ContrastSetting | [ContrastSetting, ContrastSetting]
  gamma?: number
}

/** Additive overlay of two density images of one size, each channel clamped at 255. */
export function overlayChannels(
  first: Float32Array,
  second: Float32Array,
  options: OverlayOptions = {},
): Uint8Array {
  const [contrastA, contrastB] = Array.isArray(options.contrast)
    ? options.contrast
    : [options.contrast, options.contrast]
  const levelsA = new LevelMap(resolveContrast(first, contrastA), options.gamma)
  const levelsB = new LevelMap(resolveContrast(second, contrastB), options.gamma)
  const [colourA, colourB] = CHANNEL_COLOURS
  const n = Math.min(first.length, second.length)
  const rgb = new Uint8Array(n * 3)
  for (let p = 0; p < n; p++) {
    const a = levelsA.level(first[p]!) / 255
    const b = levelsB.level(second[p]!) / 255
    for (let c = 0; c < 3; c++) {
      const sum = colourA[c]! * a + colourB[c]! * b + 0.5
      rgb[3 * p + c] = sum > 255 ? 255 : sum
    }
  }
  return rgb
}
