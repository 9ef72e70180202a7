/**
 * Basic quality statistics of a localization table: summary, column distributions, localizations
 * per frame, precision (measured and expected) and labelling density with its Nyquist resolution.
 * Pure functions over `Localizations`; each result carries its method, parameters and, when it
 * cannot be computed, a reason. `tableStatistics` runs them all, sharing passes over the rows.
 */
import type { Localizations } from '../localizations.types'
import {
  DEFAULT_DENSITY_PIXEL_NM,
  densityStatistics,
  type DensityOptions,
  type DensitySummary,
} from './density'
import { occupancy } from './occupancy'
import { distribution, type Distribution, type DistributionOptions } from './distribution'
import { countPerFrame } from './frames'
import { localizationsPerFrame, type PerFrameCurve } from './per-frame'
import { precisionStatistics, type PrecisionSummary } from './precision'
import type { PrecisionOptions } from './precision-inputs'
import type { StatisticResult } from './result'
import { summarizeTable, type TableSummary } from './summary'

export { densityStatistics, nyquistResolutionNm, DENSITY_METHOD } from './density'
export type { DensityOptions, DensitySummary } from './density'
export { distribution, DISTRIBUTION_METHOD } from './distribution'
export type { Distribution, DistributionOptions } from './distribution'
export type { NonFiniteCounts } from './fine-histogram'
export { countPerFrame } from './frames'
export type { FrameCounts } from './frames'
export { localizationsPerFrame, PER_FRAME_METHOD } from './per-frame'
export type { PerFrameCurve } from './per-frame'
export { precisionStatistics, PRECISION_METHOD } from './precision'
export type { PrecisionSummary } from './precision'
export { expectedPrecision } from './expected-precision'
export type { PrecisionFormula, PrecisionModel } from './expected-precision'
export { PRECISION_DETECTORS } from './precision-inputs'
export type { PrecisionDetector, PrecisionOptions } from './precision-inputs'
export type { ParameterValue, StatisticResult } from './result'
export { extent, summarizeTable, SUMMARY_METHOD } from './summary'
export type { Extent, TableSummary } from './summary'

/** The optional columns whose distributions `tableStatistics` reports. */
export const DISTRIBUTION_COLUMNS = ['photons', 'background', 'sigma', 'uncertainty', 'z'] as const
export type DistributionColumn = (typeof DISTRIBUTION_COLUMNS)[number]

export interface TableStatisticsOptions {
  distribution?: DistributionOptions
  precision?: PrecisionOptions
  density?: DensityOptions
  /** Most points of the per-frame curve (default 1000). */
  maxFramePoints?: number
}

export interface TableStatistics {
  summary: StatisticResult<TableSummary>
  /** One entry per optional column the table has. */
  distributions: Partial<Record<DistributionColumn, StatisticResult<Distribution>>>
  perFrame: StatisticResult<PerFrameCurve>
  precision: StatisticResult<PrecisionSummary>
  density: StatisticResult<DensitySummary>
}

/** Every statistic of this module over one table. */
export function tableStatistics(
  table: Localizations,
  options: TableStatisticsOptions = {},
): TableStatistics {
  const frameCounts = countPerFrame(table.frame, table.count)
  // One pass over x and y gives both the occupied area and the extents of the summary.
  const occupied = occupancy(table, options.density?.pixelNm ?? DEFAULT_DENSITY_PIXEL_NM)
  const summary = summarizeTable(table, frameCounts, occupied)
  const distributions: TableStatistics['distributions'] = {}
  for (const name of DISTRIBUTION_COLUMNS) {
    const column = table[name]
    if (column) distributions[name] = distribution(column, table.count, options.distribution)
  }
  const perFrame = localizationsPerFrame(table, {
    maxPoints: options.maxFramePoints,
    frameCounts,
  })
  const precision = precisionStatistics(
    table,
    { distribution: options.distribution, ...options.precision },
    distributions.uncertainty,
  )
  const density = densityStatistics(table, options.density, occupied)
  return { summary, distributions, perFrame, precision, density }
}
