import { computeSplit, type SplitBuffers, type SplitCurves } from './frc-split'
import type { Localizations } from '../localizations.types'
import { loessQuadratic } from './loess'
import { assignBlocksToHalves } from './random'
import type { RenderGrid } from './render-grid'
import type { TimeBlocks } from './render-halves'
import { correctedFrc, estimateRepeats } from './spurious-correction'
import { thresholdCrossing } from './threshold'

/** Everything one split contributes to the result. */
export interface SplitOutcome {
  frc: Float64Array
  smoothed: Float64Array
  /** Crossing frequency of the smoothed curve, cycles/nm. */
  crossing: number | null
  pixels: Float64Array
  halfA: number
  halfB: number
  correction?: {
    repeats: number | null
    corrected: Float64Array
    crossing: number | null
    plateau: [number, number]
  }
}

export interface SplitContext {
  locs: Localizations
  grid: RenderGrid
  frequencyPerNm: Float64Array
  span: number
  firstFrame: number
  frameSpan: number
  blocks: number
  /** H·sinc² per ring when the spurious correction is made. */
  transfer: Float64Array | null
  buffers: SplitBuffers
}

export function analyseSplit(context: SplitContext, random: () => number): SplitOutcome | null {
  const blocks: TimeBlocks = {
    firstFrame: context.firstFrame,
    frameSpan: context.frameSpan,
    halfOfBlock: assignBlocksToHalves(context.blocks, random),
  }
  const curves = computeSplit(context.locs, context.grid, blocks, context.buffers)
  if (curves.counts.a === 0 || curves.counts.b === 0) return null
  const smoothed = loessQuadratic(curves.frc, context.span)
  const outcome: SplitOutcome = {
    frc: curves.frc,
    smoothed,
    crossing: thresholdCrossing(smoothed, context.frequencyPerNm),
    pixels: curves.pixels,
    halfA: curves.counts.a,
    halfB: curves.counts.b,
  }
  if (context.transfer) outcome.correction = correctSplit(curves, context.transfer, context)
  return outcome
}

/** Q of one split, and its curve with the spurious correlation taken out (smoothed). */
function correctSplit(
  curves: SplitCurves,
  transfer: Float64Array,
  context: SplitContext,
): NonNullable<SplitOutcome['correction']> {
  const countScale = 1 / curves.tapered.a + 1 / curves.tapered.b
  const { numeratorMean, denominatorMean, pixels } = curves
  const estimate = estimateRepeats(numeratorMean, denominatorMean, transfer, pixels, countScale)
  const repeats = estimate.repeats ?? 0
  const raw = correctedFrc(numeratorMean, denominatorMean, transfer, repeats, countScale)
  const corrected = loessQuadratic(raw, context.span)
  const q = context.frequencyPerNm
  return {
    repeats: estimate.repeats,
    corrected,
    crossing: thresholdCrossing(corrected, q),
    plateau: [q[Math.max(0, estimate.firstRing)]!, q[Math.max(0, estimate.lastRing)]!],
  }
}
