import type { QualityMetric } from '@shared/schemas/quality.schema'
import type { DriftResult } from '../drift'
import type { FrcResult } from '../frc'
import type { MergeResult } from '../merge'
import type { NenaResult } from '../nena'
import type { StatisticResult } from '../statistics'

/**
 * Engine results as report metrics: the value people read and plot, never the per-row arrays
 * (event ids, merged positions, per-frame drift) that only the computation needs.
 */
const withReason = <T>(metric: QualityMetric<T>, reason: string | undefined): QualityMetric<T> =>
  reason ? { ...metric, reason } : metric

export function statisticMetric<T>(result: StatisticResult<T>): QualityMetric<T> {
  return withReason(
    { value: result.value, method: result.method, parameters: result.parameters },
    result.reason,
  )
}

export function frcMetric(frc: FrcResult): QualityMetric {
  const { method, parameters, reason, ...value } = frc
  return withReason(
    {
      value: value.curve.frc.length ? { ...value, curve: compactCurve(value.curve) } : null,
      method,
      parameters: { ...parameters },
    },
    reason,
  )
}

/**
 * The curve as the report keeps it: correlations to 4 decimals (a ring's own noise is ≥ 1/√pixels,
 * ≈ 0.01 at the largest rings) and frequencies to 7 significant digits. It halves a 4096² FRC's
 * share of the report (≈ 170 kB of 2049 rings), which every poll of the quality page reads.
 */
function compactCurve(curve: FrcResult['curve']): FrcResult['curve'] {
  const correlation = (values: number[]) => values.map((v) => Math.round(v * 1e4) / 1e4)
  return {
    ...curve,
    frequencyPerNm: curve.frequencyPerNm.map((f) => Number(f.toPrecision(7))),
    frc: correlation(curve.frc),
    smoothed: correlation(curve.smoothed),
    corrected: curve.corrected ? correlation(curve.corrected) : curve.corrected,
  }
}

export function mergeMetric(merge: MergeResult): QualityMetric {
  const value = merge.reason
    ? null
    : {
        events: merge.events,
        onTimeFrames: merge.onTimeFrames,
        localizationsPerEvent: merge.localizationsPerEvent,
      }
  return withReason(
    { value, method: merge.method, parameters: { ...merge.parameters } },
    merge.reason,
  )
}

export function nenaMetric(nena: NenaResult): QualityMetric {
  const { method, parameters, reason, ...value } = nena
  return withReason(
    {
      value: nena.precisionNm === null ? null : value,
      method,
      parameters: { ...parameters, pairsUsed: nena.pairsUsed },
    },
    reason,
  )
}

export function driftMetric(drift: DriftResult): QualityMetric {
  const value = drift.trajectory
    ? {
        trajectory: drift.trajectory,
        totalDriftNm: drift.totalDriftNm,
        pathLengthNm: drift.pathLengthNm,
        rmsResidualNm: drift.rmsResidualNm,
        pairsUsed: drift.pairsUsed,
        pairsDropped: drift.pairsDropped,
      }
    : null
  return withReason(
    { value, method: drift.method, parameters: { ...drift.parameters } },
    drift.reason,
  )
}
