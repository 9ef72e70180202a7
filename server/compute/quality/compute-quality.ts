import { abbeLimitNm } from '@shared/domain/optics'
import type { QualityFindings, QualityMetric } from '@shared/schemas/quality.schema'
import { applyDriftCorrection, estimateDrift, type DriftTrajectory } from '../drift'
import { computeFrc } from '../frc'
import type { Localizations } from '../localizations.types'
import { mergeLocalizations } from '../merge'
import { estimateNenaPrecision } from '../nena'
import { densityStatistics, tableStatistics, type PrecisionOptions } from '../statistics'
import { driftMetric, frcMetric, mergeMetric, nenaMetric, statisticMetric } from './metrics'

/** What the report needs from the dataset's description (all optional). */
export interface QualityInputs {
  /** Camera pixel at the sample, nm. */
  pixelNm?: number
  detector?: PrecisionOptions['detector']
  /**
   * Emission wavelength, nm, and objective NA: the diffraction limit to compare with, and the
   * ideal PSF width (a lower bound) when neither the table nor the description gives one.
   */
  emissionNm?: number
  numericalAperture?: number
  /** The description's fitted PSF SD, nm: used when the table has no sigma column. */
  psfSigmaNm?: number
  /** Camera read noise, e⁻ RMS per pixel (= detected photons in a table's units). */
  readNoisePhotons?: number
}

/** The steps of a report and the share of the work each stands for (progress). */
const STEPS = { statistics: 0.1, merge: 0.1, nena: 0.1, frc: 0.3, drift: 0.2, frcCorrected: 0.2 }
export type Step = keyof typeof STEPS

/**
 * Every quality metric of one localization table, in the order a reader judges a dataset by:
 * counts and distributions, precision (the table's own and expected), NeNA, merging into
 * emitters, FRC with its correction for repeated localizations, drift by RCC and the FRC after
 * correcting it, labelling density with its Nyquist resolution, and the diffraction limit.
 */
export function computeQuality(
  locs: Localizations,
  inputs: QualityInputs = {},
  onProgress: (fraction: number, step: string) => void = () => {},
): QualityFindings {
  const steps = stepTracker(onProgress)
  const stats = steps.run('statistics', () => statisticsOf(locs, inputs))
  const merge = steps.run('merge', () => mergeLocalizations(locs))
  const nena = steps.run('nena', () => estimateNenaPrecision(locs))
  const frc = steps.run('frc', () => computeFrc(locs))
  const drift = steps.run('drift', () => estimateDrift(locs))
  const frcCorrected = steps.run('frcCorrected', () => driftCorrectedFrc(locs, drift.trajectory))
  onProgress(1, 'done')
  return assembleFindings(locs, inputs, { stats, merge, nena, frc, drift, frcCorrected })
}

export type QualityParts = {
  stats: ReturnType<typeof tableStatistics>
  merge: ReturnType<typeof mergeLocalizations>
  nena: ReturnType<typeof estimateNenaPrecision>
  frc: ReturnType<typeof computeFrc>
  drift: ReturnType<typeof estimateDrift>
  frcCorrected: ReturnType<typeof computeFrc> | null
}

/** The table's statistics, its expected precision from everything the description gives. */
export const statisticsOf = (locs: Localizations, inputs: QualityInputs) =>
  tableStatistics(locs, {
    precision: {
      pixelNm: inputs.pixelNm,
      detector: inputs.detector,
      psfSigmaNm: inputs.psfSigmaNm,
      emissionNm: inputs.emissionNm,
      numericalAperture: inputs.numericalAperture,
      readNoisePhotons: inputs.readNoisePhotons,
    },
  })

/** FRC of the table after subtracting the drift trajectory; null without one. */
export function driftCorrectedFrc(locs: Localizations, trajectory: DriftTrajectory | null) {
  return trajectory ? computeFrc({ ...locs, ...applyDriftCorrection(locs, trajectory) }) : null
}

/** Progress over the steps, each weighted by the share of the work it stands for. */
export function stepTracker(onProgress: (fraction: number, step: string) => void) {
  let done = 0
  return {
    run<T>(step: Step, work: () => T): T {
      onProgress(done, step)
      const result = work()
      done += STEPS[step]
      return result
    },
    started(step: Step) {
      onProgress(done, step)
    },
    finished(step: Step) {
      done += STEPS[step]
    },
  }
}

/** The report from its computed parts (the same whichever thread computed which part). */
export function assembleFindings(
  locs: Localizations,
  inputs: QualityInputs,
  { stats, merge, nena, frc, drift, frcCorrected }: QualityParts,
): QualityFindings {
  const mergedDensity = merge.reason
    ? null
    : densityStatistics(locs, { mergedEvents: merge.events })
  const diffraction = diffractionMetric(inputs)
  const precision = stats.precision.value
  const densityValue = (mergedDensity?.value ?? stats.density.value) as {
    nyquistResolutionNm?: number | null
  } | null
  return {
    localizations: locs.count,
    frames: stats.summary.value?.frames?.distinct ?? null,
    photonsMedian: stats.distributions.photons?.value?.median ?? null,
    precisionMedianNm: precision?.medianNm ?? null,
    expectedPrecisionNm: precision?.expectedMedianNm ?? null,
    nenaPrecisionNm: nena.precisionNm,
    frcResolutionNm: frc.resolutionNm,
    frcResolutionUncorrectedNm: frc.resolutionUncorrectedNm,
    // Like for like with frcResolutionUncorrectedNm: the repeat correction's Q is unreliable on
    // drifting data (drift blurs the plateau it is read from), so the comparison leaves it out.
    frcDriftCorrectedNm: frcCorrected?.resolutionUncorrectedNm ?? null,
    localizationsPerEmitter: frc.localizationsPerEmitter,
    nyquistResolutionNm: densityValue?.nyquistResolutionNm ?? null,
    diffractionLimitNm: diffraction.value,
    driftNm: drift.totalDriftNm,
    drift: drift.trajectory
      ? { frame: drift.trajectory.frame, x: drift.trajectory.x, y: drift.trajectory.y }
      : null,
    mergedEmitters: merge.reason ? null : merge.events,
    metrics: {
      summary: statisticMetric(stats.summary),
      ...Object.fromEntries(
        Object.entries(stats.distributions).map(([name, d]) => [name, statisticMetric(d)]),
      ),
      perFrame: statisticMetric(stats.perFrame),
      precision: statisticMetric(stats.precision),
      nena: nenaMetric(nena),
      merge: mergeMetric(merge),
      frc: frcMetric(frc),
      frcDriftCorrected: frcCorrected
        ? frcMetric(frcCorrected)
        : {
            value: null,
            method: frc.method,
            parameters: {},
            reason: 'No drift trajectory to correct with.',
          },
      drift: driftMetric(drift),
      density: statisticMetric(stats.density),
      densityMerged: mergedDensity
        ? statisticMetric(mergedDensity)
        : { value: null, method: 'merged events', parameters: {}, reason: merge.reason },
      diffraction,
    },
  }
}

function diffractionMetric(inputs: QualityInputs): QualityMetric<number> {
  const method = "Abbe's limit λ/(2 NA), from the emission wavelength and the objective's NA"
  const { emissionNm, numericalAperture } = inputs
  if (!emissionNm || !numericalAperture)
    return {
      value: null,
      method,
      parameters: {},
      reason: 'The description gives no emission wavelength or objective NA.',
    }
  return {
    value: abbeLimitNm(emissionNm, numericalAperture),
    method,
    parameters: { emissionNm, numericalAperture },
  }
}
