import type { FrcOptions } from './frc.types'

/**
 * Defaults: 5 nm pixels (fine enough for resolutions down to ~20 nm); 50 time blocks as in the
 * published reference code; 3 splits (the split-to-split SD is a few per cent of the value and each
 * split costs one render and FFT); 4096² grid at most (256 MB of complex image).
 */
export const FRC_DEFAULTS: Required<FrcOptions> = {
  pixelNm: 5,
  blocks: 50,
  splits: 3,
  seed: 1,
  maxSize: 4096,
  correctSpurious: true,
  precisionPairing: 'same',
}

/** Grid sides allowed for maxSize; larger grids would not fit a worker's memory budget. */
const GRID_LIMITS = { smallest: 64, largest: 8192 }

function positiveInteger(value: number | undefined, fallback: number, least: number): number {
  if (value === undefined || !Number.isFinite(value)) return fallback
  return Math.max(least, Math.round(value))
}

function powerOfTwoAtMost(value: number): number {
  let size = GRID_LIMITS.smallest
  while (size * 2 <= Math.min(value, GRID_LIMITS.largest)) size *= 2
  return size
}

/** Options with defaults filled in and out-of-range values brought into range. */
export function resolveOptions(options: FrcOptions = {}): Required<FrcOptions> {
  const pixelNm =
    options.pixelNm !== undefined && options.pixelNm > 0 && Number.isFinite(options.pixelNm)
      ? options.pixelNm
      : FRC_DEFAULTS.pixelNm
  return {
    pixelNm,
    blocks: positiveInteger(options.blocks, FRC_DEFAULTS.blocks, 2),
    splits: positiveInteger(options.splits, FRC_DEFAULTS.splits, 1),
    seed: positiveInteger(options.seed, FRC_DEFAULTS.seed, 0),
    maxSize: powerOfTwoAtMost(positiveInteger(options.maxSize, FRC_DEFAULTS.maxSize, 1)),
    correctSpurious: options.correctSpurious ?? FRC_DEFAULTS.correctSpurious,
    precisionPairing: options.precisionPairing === 'independent' ? 'independent' : 'same',
  }
}
