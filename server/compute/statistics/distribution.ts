/**
 * Distribution of one numeric column: a plotting histogram over a robust range (by default the
 * 0.5th–99.5th percentiles), median and quartiles with a stated error bound, and NaN/±∞ counted
 * apart. Two cheap steps: a systematic sample picks the range of a fine histogram, then one pass
 * over every row fills it; quantiles and plotting bins are read from the fine bins.
 */
import type { NumericColumn } from '../localizations.types'
import {
  buildFineHistogram,
  quantileFromHistogram,
  type ChunkVisitor,
  type FineHistogram,
  type NonFiniteCounts,
} from './fine-histogram'
import { finiteRange, systematicSample } from './sampling'
import { computed, notComputable, type StatisticResult } from './result'

export interface DistributionOptions {
  /** Most plotting bins (default 100). */
  bins?: number
  /** Plotting range in percentiles (default 0.5 and 99.5). */
  lowerPercentile?: number
  upperPercentile?: number
  /** Bins of the fine histogram behind quantiles and plotting bins (default 4096). */
  fineBins?: number
  /** Rows in the sample that sets the fine histogram's range (default 16 384). */
  sampleSize?: number
}

export interface Distribution {
  /** Finite values; the statistics below use only these. */
  count: number
  nonFinite: NonFiniteCounts
  mean: number
  lowerQuartile: number
  median: number
  upperQuartile: number
  /** Largest error of the three quantiles above: the fine bin width. */
  quantileResolution: number
  /** Bin edges (counts.length + 1), half-open bins [edge i, edge i+1). */
  edges: number[]
  counts: number[]
  /** Finite values left of the first edge and at or right of the last one. */
  below: number
  above: number
}

const DEFAULTS = {
  bins: 100,
  lowerPercentile: 0.5,
  upperPercentile: 99.5,
  fineBins: 4096,
  sampleSize: 16_384,
}
// The fine range spans the sample's second-smallest to second-largest value (about its 0.01st
// to 99.99th percentiles), far enough out that the plotting percentiles fall inside it unless the
// sample is very unlucky (then: the exact range).
const SAMPLE_TAIL = 1e-4

export const DISTRIBUTION_METHOD =
  'Histogram over a percentile range; quantile of order p = the value of rank ⌈p·n⌉, located in a ' +
  'fine histogram and interpolated by rank inside its bin (error below one fine bin); NaN and ±∞ ' +
  'counted and left out'

function sampleRange(sample: Float64Array) {
  if (sample.length === 0) return null
  const tail = Math.floor(SAMPLE_TAIL * sample.length)
  const lo = sample[tail] ?? 0
  const hi = sample[sample.length - 1 - tail] ?? 0
  return hi > lo ? { lo, hi } : null
}

/**
 * Plotting bins made of whole fine bins, from the one holding qLow to the one holding qHigh; the
 * last plotting bin may hold fewer fine bins than the others.
 */
function plottingBins(fine: FineHistogram, qLow: number, qHigh: number, most: number) {
  const fineBins = fine.counts.length
  const first = Math.max(0, Math.floor((qLow - fine.lo) / fine.width))
  const last = Math.min(fineBins - 1, Math.floor((qHigh - fine.lo) / fine.width))
  const group = Math.ceil((last - first + 1) / most)
  const edges = [fine.lo + first * fine.width]
  const counts: number[] = []
  let below = fine.under
  for (let j = 0; j < first; j++) below += fine.counts[j] ?? 0
  for (let start = first; start <= last; start += group) {
    const end = Math.min(start + group, last + 1)
    let sum = 0
    for (let j = start; j < end; j++) sum += fine.counts[j] ?? 0
    counts.push(sum)
    edges.push(fine.lo + end * fine.width)
  }
  let above = fine.over
  for (let j = last + 1; j < fineBins; j++) above += fine.counts[j] ?? 0
  return { edges, counts, below, above }
}

function quantiles(fine: FineHistogram, settings: typeof DEFAULTS) {
  const ps = [0.25, 0.5, 0.75, settings.lowerPercentile / 100, settings.upperPercentile / 100]
  const values = ps.map((p) => quantileFromHistogram(fine, p))
  return values.every((v) => v !== null) ? values : null
}

/** Values a distribution describes: a sorted sample of them and every row in chunks. */
export interface ValueSource {
  count: number
  /** Sorted finite values of a systematic sample of about `size` rows. */
  sample(size: number): Float64Array
  chunks: ChunkVisitor
}

/** Distribution of the first `count` values of a column (see DistributionOptions for defaults). */
export function distribution(
  values: NumericColumn,
  count: number = values.length,
  options: DistributionOptions = {},
): StatisticResult<Distribution> {
  const source: ValueSource = {
    count,
    sample: (size) => systematicSample(values, count, size),
    chunks: (visit) => visit(values, count),
  }
  return distributionOf(source, options)
}

/** Distribution of values from any source, e.g. computed chunk by chunk without a full column. */
export function distributionOf(
  source: ValueSource,
  options: DistributionOptions = {},
): StatisticResult<Distribution> {
  const settings = { ...DEFAULTS, ...options }
  const parameters = { ...settings, quantileDefinition: 'rank ⌈p·n⌉' }
  const method = DISTRIBUTION_METHOD
  if (source.count === 0) return notComputable('The column has no rows.', method, parameters)
  let range = sampleRange(source.sample(settings.sampleSize)) ?? finiteRange(source.chunks)
  let fine = buildFineHistogram(source.chunks, range, settings.fineBins)
  if (fine.finite === 0) {
    return notComputable('The column has no finite values.', method, parameters)
  }
  let q = quantiles(fine, settings)
  if (q === null) {
    // The sample missed the tails: the exact range puts every value inside the fine bins.
    range = finiteRange(source.chunks)
    fine = buildFineHistogram(source.chunks, range, settings.fineBins)
    q = quantiles(fine, settings)
  }
  const [lowerQuartile = 0, median = 0, upperQuartile = 0, qLow = 0, qHigh = 0] = q ?? []
  const bins = plottingBins(fine, qLow, qHigh, settings.bins)
  return computed(
    {
      count: fine.finite,
      nonFinite: fine.nonFinite,
      mean: fine.sum / fine.finite,
      lowerQuartile,
      median,
      upperQuartile,
      quantileResolution: fine.width,
      ...bins,
    },
    method,
    parameters,
  )
}
