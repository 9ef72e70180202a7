import { FRC_METHOD } from './frc-result'
import type { FrcParameters, FrcResult } from './frc.types'
import type { SplitOutcome } from './split-analysis'
import { FRC_THRESHOLD } from './threshold'

function meanOf(values: number[]): number {
  let sum = 0
  for (const value of values) sum += value
  return sum / values.length
}

/** Sample standard deviation; null below two values. */
function sdOf(values: number[]): number | null {
  if (values.length < 2) return null
  const mean = meanOf(values)
  let sum = 0
  for (const value of values) sum += (value - mean) ** 2
  return Math.sqrt(sum / (values.length - 1))
}

function meanCurve(curves: ArrayLike<number>[]): number[] {
  const length = curves[0]?.length ?? 0
  const mean = new Array<number>(length).fill(0)
  for (const curve of curves) for (let k = 0; k < length; k++) mean[k]! += curve[k]! / curves.length
  return mean
}

/** Resolutions (nm) of the splits that crossed; null when fewer than half did. */
function resolutions(crossings: (number | null)[]): number[] | null {
  const values: number[] = []
  for (const q of crossings) if (q !== null && q > 0) values.push(1 / q)
  return values.length * 2 >= crossings.length ? values : null
}

export function summarizeSplits(
  outcomes: SplitOutcome[],
  frequencyPerNm: Float64Array,
  parameters: FrcParameters,
): FrcResult {
  const corrections = outcomes.flatMap((outcome) =>
    outcome.correction ? [outcome.correction] : [],
  )
  const corrected = corrections.length === outcomes.length && corrections.length > 0
  const uncorrected = resolutions(outcomes.map((outcome) => outcome.crossing))
  const final = corrected ? resolutions(corrections.map((c) => c.crossing)) : uncorrected
  const repeats = corrections.flatMap((c) => (c.repeats === null ? [] : [c.repeats]))
  parameters.localizationsHalfA = meanOf(outcomes.map((outcome) => outcome.halfA))
  parameters.localizationsHalfB = meanOf(outcomes.map((outcome) => outcome.halfB))
  parameters.localizationsUsed = parameters.localizationsHalfA + parameters.localizationsHalfB
  parameters.splitsWithCrossing = final?.length ?? 0
  if (corrected) {
    parameters.spuriousCorrection = 'applied'
    parameters.plateauPerNm = corrections[0]?.plateau
  }
  const result: FrcResult = {
    resolutionNm: final ? meanOf(final) : null,
    resolutionUncorrectedNm: uncorrected ? meanOf(uncorrected) : null,
    spreadNm: final ? sdOf(final) : null,
    localizationsPerEmitter: repeats.length > 0 ? meanOf(repeats) : null,
    curve: {
      frequencyPerNm: Array.from(frequencyPerNm),
      frc: meanCurve(outcomes.map((outcome) => outcome.frc)),
      smoothed: meanCurve(outcomes.map((outcome) => outcome.smoothed)),
      pixelsInRing: Array.from(outcomes[0]?.pixels ?? []),
    },
    threshold: FRC_THRESHOLD,
    method: FRC_METHOD,
    parameters,
  }
  if (corrected) result.curve.corrected = meanCurve(corrections.map((c) => c.corrected))
  if (result.resolutionNm === null) {
    result.reason = `the smoothed FRC did not fall below 1/7 before Nyquist in most splits`
  }
  return result
}
