import type { QualityMetric, QualityReportDto } from '../schemas/quality.schema'

/**
 * The parts of a quality report's metric values the page reads. The server sends each value as
 * JSON of its own shape; these narrow interfaces name only what is shown, and the readers below
 * check that shape before handing a value on, so a metric that changed shape is left out rather
 * than drawn wrong.
 */

export interface DistributionValue {
  edges: number[]
  counts: number[]
  median: number
  lowerQuartile: number
  upperQuartile: number
  mean: number
}

export interface PerFrameValue {
  startFrame: number[]
  frames: number[]
  meanPerFrame: number[]
  total: number[]
}

export interface PrecisionValue {
  source: string
  medianNm: number
  distribution: DistributionValue
  expectedMedianNm: number | null
  expectedFormula: string | null
  measuredToExpected: number | null
}

export interface FrcCurveValue {
  frequencyPerNm: number[]
  frc: number[]
  smoothed: number[]
  corrected?: number[]
  pixelsInRing: number[]
}

export interface FrcValue {
  resolutionNm: number | null
  resolutionUncorrectedNm: number | null
  spreadNm: number | null
  localizationsPerEmitter: number | null
  threshold: number
  curve: FrcCurveValue
}

export interface DriftTrace {
  frame: number[]
  x: number[]
  y: number[]
}

export interface DriftValue {
  trajectory: DriftTrace
  totalDriftNm: number | null
}

export interface DensityValue {
  countingUnit: string
  occupiedAreaUm2: number
  densityPerUm2: number
  nyquistResolutionNm: number
}

export interface MergeValue {
  events: number
  localizationsPerEvent: { mean: number | null; median: number | null }
}

type Fields = Record<string, unknown>

const isRecord = (v: unknown): v is Fields =>
  typeof v === 'object' && v !== null && !Array.isArray(v)
const isNumber = (v: unknown): v is number => typeof v === 'number'
const isNumberOrNull = (v: unknown) => v === null || isNumber(v)
const isNumberArray = (v: unknown): v is number[] => Array.isArray(v) && v.every(isNumber)
const numbers = (v: Fields, keys: string[]) => keys.every((k) => isNumber(v[k]))
const arrays = (v: Fields, keys: string[]) => keys.every((k) => isNumberArray(v[k]))

const isDistribution = (v: unknown): v is Fields =>
  isRecord(v) &&
  arrays(v, ['edges', 'counts']) &&
  numbers(v, ['median', 'lowerQuartile', 'upperQuartile', 'mean'])

const isDriftTrace = (v: unknown): v is Fields => isRecord(v) && arrays(v, ['frame', 'x', 'y'])

/** The metric's value when it was computed and has the shape `check` accepts. */
function readValue<T>(
  metric: QualityMetric | null | undefined,
  check: (v: Fields) => boolean,
): T | null {
  const value = metric?.value
  return isRecord(value) && check(value) ? (value as T) : null
}

export const metricOf = (report: QualityReportDto, key: string): QualityMetric | null =>
  report.metrics[key] ?? null

export const distributionValue = (m: QualityMetric | null | undefined) =>
  readValue<DistributionValue>(m, isDistribution)

export const perFrameValue = (m: QualityMetric | null | undefined) =>
  readValue<PerFrameValue>(m, (v) => arrays(v, ['startFrame', 'frames', 'meanPerFrame', 'total']))

export const precisionValue = (m: QualityMetric | null | undefined) =>
  readValue<PrecisionValue>(
    m,
    (v) =>
      isNumber(v.medianNm) &&
      isDistribution(v.distribution) &&
      isNumberOrNull(v.expectedMedianNm) &&
      isNumberOrNull(v.measuredToExpected),
  )

export const frcValue = (m: QualityMetric | null | undefined) =>
  readValue<FrcValue>(
    m,
    (v) =>
      isNumberOrNull(v.resolutionNm) &&
      isNumber(v.threshold) &&
      isRecord(v.curve) &&
      arrays(v.curve, ['frequencyPerNm', 'frc', 'smoothed']) &&
      (v.curve.corrected === undefined || isNumberArray(v.curve.corrected)),
  )

export const driftValue = (m: QualityMetric | null | undefined) =>
  readValue<DriftValue>(m, (v) => isDriftTrace(v.trajectory) && isNumberOrNull(v.totalDriftNm))

export const densityValue = (m: QualityMetric | null | undefined) =>
  readValue<DensityValue>(
    m,
    (v) =>
      typeof v.countingUnit === 'string' &&
      numbers(v, ['occupiedAreaUm2', 'densityPerUm2', 'nyquistResolutionNm']),
  )

export const mergeValue = (m: QualityMetric | null | undefined) =>
  readValue<MergeValue>(m, (v) => isNumber(v.events) && isRecord(v.localizationsPerEvent))

/** The density the Nyquist resolution is judged by: merged events when merging worked. */
export function labellingDensity(report: QualityReportDto): {
  metric: QualityMetric | null
  value: DensityValue | null
} {
  const merged = metricOf(report, 'densityMerged')
  const mergedValue = densityValue(merged)
  if (mergedValue) return { metric: merged, value: mergedValue }
  const raw = metricOf(report, 'density')
  return { metric: raw, value: densityValue(raw) }
}
