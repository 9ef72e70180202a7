import sharp from 'sharp'
import type { Thumbnail } from './raw-stack.types'

export const THUMBNAIL_LONGEST_SIDE = 512
const LOW_QUANTILE = 0.001
const HIGH_QUANTILE = 0.999

/** Quantile by linear interpolation between order statistics (Hyndman & Fan 1996, type 7). */
export function quantileOfSorted(sorted: Float64Array, p: number): number {
  if (sorted.length === 0) return Number.NaN
  const h = (sorted.length - 1) * p
  const below = Math.floor(h)
  const lower = sorted[below]!
  const upper = sorted[Math.min(below + 1, sorted.length - 1)]!
  return lower + (h - below) * (upper - lower)
}

/** Linear stretch: `black` and below → 0, `white` and above → 255, rounded in between. */
export function stretchToBytes(values: Float64Array, black: number, white: number): Uint8Array {
  const bytes = new Uint8Array(values.length)
  const range = white - black
  for (let i = 0; i < values.length; i++) {
    const v = values[i]!
    const level = range > 0 ? ((v - black) / range) * 255 : v > black ? 255 : 0
    bytes[i] = level <= 0 ? 0 : level >= 255 ? 255 : Math.round(level)
  }
  return bytes
}

export function contrastLimits(image: Float64Array): { black: number; white: number } {
  const sorted = image.filter(Number.isFinite).sort()
  return {
    black: quantileOfSorted(sorted, LOW_QUANTILE),
    white: quantileOfSorted(sorted, HIGH_QUANTILE),
  }
}

/** A grayscale PNG of an image, stretched between its 0.1 % and 99.9 % quantiles, ≤ 512 px a side. */
export async function renderThumbnail(
  image: Float64Array,
  width: number,
  height: number,
): Promise<Thumbnail> {
  const { black, white } = contrastLimits(image)
  let picture = sharp(stretchToBytes(image, black, white), { raw: { width, height, channels: 1 } })
  if (Math.max(width, height) > THUMBNAIL_LONGEST_SIDE) {
    picture = picture.resize(THUMBNAIL_LONGEST_SIDE, THUMBNAIL_LONGEST_SIDE, { fit: 'inside' })
  }
  const { data, info } = await picture
    .toColourspace('b-w')
    .png()
    .toBuffer({ resolveWithObject: true })
  return { png: data, width: info.width, height: info.height, black, white }
}
