/**
 * Contrast: which pixel value maps to the bottom and the top of a colormap.
 *
 * 'auto' puts the top at a percentile (default 99.5) of the positive pixels and the bottom at 0,
 * so a few very bright pixels (repeated localizations of one emitter, fiducials) do not darken
 * everything else, and empty background does not drag the percentile down (common practice).
 * The percentile is the linear interpolation between order statistics at rank (n − 1)·p/100
 * (Hyndman & Fan 1996, definition 7; the default of numpy and R). 'manual' takes low and high.
 */

export type ContrastSetting =
  { mode: 'auto'; percentile?: number } | { mode: 'manual'; low: number; high: number }

export const DEFAULT_CONTRAST_PERCENTILE = 99.5

export interface ResolvedContrast {
  low: number
  high: number
  method: 'auto-percentile' | 'manual'
  percentile: number | null
  /** Why the image has no usable range (then everything maps to the bottom). */
  reason?: string
}

export function resolveContrast(
  image: Float32Array,
  setting: ContrastSetting = { mode: 'auto' },
): ResolvedContrast {
  if (setting.mode === 'manual') {
    const { low, high } = setting
    const usable = Number.isFinite(low) && Number.isFinite(high) && high > low
    if (usable) return { low, high, method: 'manual', percentile: null }
    return {
      low: 0,
      high: 1,
      method: 'manual',
      percentile: null,
      reason: 'manual range is not low < high',
    }
  }
  const p = setting.percentile ?? DEFAULT_CONTRAST_PERCENTILE
  const percentile = Number.isFinite(p)
    ? Math.min(100, Math.max(0, p))
    : DEFAULT_CONTRAST_PERCENTILE
  const high = percentileOfPositive(image, percentile)
  if (high === null) {
    return { low: 0, high: 1, method: 'auto-percentile', percentile, reason: 'no positive pixels' }
  }
  return { low: 0, high, method: 'auto-percentile', percentile }
}

const BIN_COUNT = 4096

/**
 * Percentile of the positive, finite pixels, exact, in O(n): bin by value, find the bins holding
 * the two order statistics, and sort only those bins' values.
 */
export function percentileOfPositive(image: Float32Array, percentile: number): number | null {
  let n = 0
  let max = 0
  for (let i = 0; i < image.length; i++) {
    const v = image[i]!
    if (v > 0 && v < Infinity) {
      n++
      if (v > max) max = v
    }
  }
  if (n === 0) return null
  const rank = ((n - 1) * percentile) / 100
  const k0 = Math.floor(rank)
  const k1 = Math.min(k0 + 1, n - 1)
  const binOf = (v: number) => Math.min(BIN_COUNT - 1, Math.floor((v / max) * BIN_COUNT))
  const counts = new Float64Array(BIN_COUNT)
  for (let i = 0; i < image.length; i++) {
    const v = image[i]!
    if (v > 0 && v < Infinity) {
      const b = binOf(v)
      counts[b] = counts[b]! + 1
    }
  }
  const { bin: b0, before } = binOfRank(counts, k0)
  const { bin: b1 } = binOfRank(counts, k1)
  const picked = new Float32Array(countBetween(counts, b0, b1))
  let at = 0
  for (let i = 0; i < image.length; i++) {
    const v = image[i]!
    if (v > 0 && v < Infinity) {
      const b = binOf(v)
      if (b >= b0 && b <= b1) picked[at++] = v
    }
  }
  picked.sort()
  const v0 = picked[k0 - before]!
  const v1 = picked[k1 - before]!
  return v0 + (rank - k0) * (v1 - v0)
}

function binOfRank(counts: Float64Array, rank: number): { bin: number; before: number } {
  let before = 0
  for (let b = 0; b < counts.length; b++) {
    if (before + counts[b]! > rank) return { bin: b, before }
    before += counts[b]!
  }
  return { bin: counts.length - 1, before: before - counts[counts.length - 1]! }
}

function countBetween(counts: Float64Array, from: number, to: number): number {
  let total = 0
  for (let b = from; b <= to; b++) total += counts[b]!
  return total
}

const LEVEL_STEPS = 16384

/**
 * Maps a pixel value to a colormap entry 0…255: t = (v − low)/(high − low) clamped to [0, 1],
 * then t^gamma (gamma < 1 lifts faint structure). The power is tabulated over 16 384 steps of t.
 */
/** The gamma curve as a table, per gamma: building one costs more than colouring a small tile. */
const gammaTables = new Map<number, Uint8Array>()

function gammaLevels(gamma: number): Uint8Array {
  let levels = gammaTables.get(gamma)
  if (!levels) {
    levels = new Uint8Array(LEVEL_STEPS + 1)
    for (let q = 0; q <= LEVEL_STEPS; q++)
      levels[q] = Math.round(Math.pow(q / LEVEL_STEPS, gamma) * 255)
    if (gammaTables.size >= 32) gammaTables.clear()
    gammaTables.set(gamma, levels)
  }
  return levels
}

export class LevelMap {
  private readonly low: number
  private readonly scale: number
  private readonly levels: Uint8Array

  constructor(contrast: ResolvedContrast, gamma = 1) {
    this.low = contrast.low
    this.scale = LEVEL_STEPS / (contrast.high - contrast.low)
    this.levels = gammaLevels(Number.isFinite(gamma) && gamma > 0 ? gamma : 1)
  }

  /** Entry 0…255; NaN maps to 0. */
  level(v: number): number {
    const u = (v - this.low) * this.scale
    if (!(u > 0)) return 0
    return this.levels[u >= LEVEL_STEPS ? LEVEL_STEPS : (u + 0.5) | 0]!
  }
}
