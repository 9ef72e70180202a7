import type { Localizations } from '../localizations.types'
import { resolveOptions } from './frc-options'
import type { FrcOptions, FrcResult } from './frc.types'
import { baseParameters, undeterminedResult } from './frc-result'
import { checkInput } from './input-checks'
import { seededRandom } from './random'
import { chooseGrid } from './render-grid'
import { analyseSplit, type SplitContext, type SplitOutcome } from './split-analysis'
import { pixelTransfer, precisionTransfer } from './spurious-correction'
import { summarizeSplits } from './summary'

type Settings = Required<FrcOptions>

/** H·sinc² per ring, or the reason the spurious correction cannot be made. */
function combinedTransfer(locs: Localizations, frequencyPerNm: Float64Array, settings: Settings) {
  const pixelNm = settings.pixelNm
  const { uncertainty, count } = locs
  const precision = precisionTransfer(uncertainty, count, frequencyPerNm, settings.precisionPairing)
  if ('reason' in precision) return precision
  const transfer = precision.transfer
  for (let k = 0; k < transfer.length; k++) {
    transfer[k] = transfer[k]! * pixelTransfer(frequencyPerNm[k]!, pixelNm)
  }
  return { transfer }
}

const EMPTY_HALF_REASON = 'one half of a split holds no localizations on the grid'

/** The splits' outcomes, or null as soon as one split leaves a half empty. */
function runSplits(context: SplitContext, settings: Settings): SplitOutcome[] | null {
  const random = seededRandom(settings.seed)
  const outcomes: SplitOutcome[] = []
  for (let s = 0; s < settings.splits; s++) {
    const outcome = analyseSplit(context, random)
    if (!outcome) return null
    outcomes.push(outcome)
  }
  return outcomes
}

/**
 * Fourier ring correlation of a localization table (Nieuwenhuizen et al. 2013, Nat Methods 10:557):
 * the run is cut into time blocks dealt at random to two halves, each half rendered as a 2D
 * histogram, tapered, and the two correlated ring by ring; the smoothed curve's first fall through
 * 1/7 gives the resolution. Bad input gives null values and a reason, never an exception.
 */
export function computeFrc(locs: Localizations, options?: FrcOptions): FrcResult {
  const settings = resolveOptions(options)
  const checked = checkInput(locs, settings.blocks, settings.pixelNm)
  if ('reason' in checked) return undeterminedResult(baseParameters(settings), checked.reason)
  const grid = chooseGrid(checked.extent, settings.pixelNm, settings.maxSize)
  const parameters = baseParameters(settings, grid)
  const rings = grid.size / 2 + 1
  const frequencyPerNm = Float64Array.from(
    { length: rings },
    (_, k) => k / (grid.size * grid.pixelNm),
  )
  let transfer: Float64Array | null = null
  if (settings.correctSpurious) {
    const formed = combinedTransfer(locs, frequencyPerNm, settings)
    if ('reason' in formed) parameters.spuriousCorrection = `not made: ${formed.reason}`
    else transfer = formed.transfer
  }
  const context: SplitContext = {
    locs,
    grid,
    frequencyPerNm,
    span: parameters.smoothingSpan,
    firstFrame: checked.extent.minFrame,
    frameSpan: checked.extent.maxFrame - checked.extent.minFrame + 1,
    blocks: settings.blocks,
    transfer,
    buffers: { re: new Float32Array(grid.size ** 2), im: new Float32Array(grid.size ** 2) },
  }
  const outcomes = runSplits(context, settings)
  if (!outcomes) return undeterminedResult(parameters, EMPTY_HALF_REASON)
  return summarizeSplits(outcomes, frequencyPerNm, parameters)
}
