/**
 * Localization precision of a table: the table's own uncertainty column when it has one, else the
 * precision its photon counts predict (Thompson 2002, or Mortensen 2010 with the EMCCD excess-noise
 * factor for EMCCD detectors), plus the ratio of the two medians for the plain-language verdict.
 */
import type { Localizations } from '../localizations.types'
import { distribution, distributionOf, type Distribution } from './distribution'
import {
  describePrecisionInputs,
  expectationInputs,
  expectedValues,
  type PrecisionInputs,
  type PrecisionOptions,
} from './precision-inputs'
import { computed, notComputable, type StatisticResult } from './result'

export interface PrecisionSummary {
  source: 'uncertainty column' | 'expected from photons'
  medianNm: number
  distribution: Distribution
  /** Median precision the photon counts predict, and the formula used; null without photons. */
  expectedMedianNm: number | null
  expectedFormula: string | null
  /** Median of the column ÷ expected median (1 = as good as photon statistics allow). */
  measuredToExpected: number | null
}

export const PRECISION_METHOD =
  'Median and distribution of the uncertainty column when present, else of the precision expected ' +
  'per localization from its photons and background (one PSF width and pixel size per table); ' +
  'measured-to-expected ratio = ratio of the two medians'

const DEFAULT_SAMPLE = 65_536

/** Median (rank ⌈n/2⌉) of the expected precision over a systematic sample of rows. */
function expectedMedian(table: Localizations, inputs: PrecisionInputs, sampleSize: number) {
  const values = expectedValues(table, inputs).sample(sampleSize)
  return values.length ? (values[Math.ceil(values.length / 2) - 1] ?? null) : null
}

type Parameters = StatisticResult<PrecisionSummary>['parameters']

/** From the table's own column, with the expected median beside it when photons allow. */
function fromColumn(
  table: Localizations & { uncertainty: NonNullable<Localizations['uncertainty']> },
  inputs: PrecisionInputs | string,
  options: PrecisionOptions,
  measured: StatisticResult<Distribution>,
  parameters: Parameters,
): StatisticResult<PrecisionSummary> {
  if (!measured.value) return notComputable(measured.reason ?? '', PRECISION_METHOD, parameters)
  const sampleSize = options.sampleSize ?? DEFAULT_SAMPLE
  const expected = typeof inputs === 'string' ? null : expectedMedian(table, inputs, sampleSize)
  const summary: PrecisionSummary = {
    source: 'uncertainty column',
    medianNm: measured.value.median,
    distribution: measured.value,
    expectedMedianNm: expected,
    expectedFormula: expected === null ? null : String(parameters.formula),
    measuredToExpected: expected ? measured.value.median / expected : null,
  }
  return computed(summary, PRECISION_METHOD, { ...parameters, expectedSampleRows: sampleSize })
}

/** From photons and background alone, every row. */
function fromPhotons(
  table: Localizations,
  inputs: PrecisionInputs,
  options: PrecisionOptions,
  parameters: Parameters,
): StatisticResult<PrecisionSummary> {
  const expected = distributionOf(expectedValues(table, inputs), options.distribution)
  if (!expected.value) {
    return notComputable('No row has usable photons and background.', PRECISION_METHOD, parameters)
  }
  const summary: PrecisionSummary = {
    source: 'expected from photons',
    medianNm: expected.value.median,
    distribution: expected.value,
    expectedMedianNm: expected.value.median,
    expectedFormula: String(parameters.formula),
    measuredToExpected: null,
  }
  return computed(summary, PRECISION_METHOD, parameters)
}

/** Precision statistics; pass the uncertainty column's distribution if already computed. */
export function precisionStatistics(
  table: Localizations,
  options: PrecisionOptions = {},
  uncertaintyDistribution?: StatisticResult<Distribution>,
): StatisticResult<PrecisionSummary> {
  const inputs = expectationInputs(table, options)
  const parameters = describePrecisionInputs(inputs)
  if (table.count === 0) {
    return notComputable('The table has no localizations.', PRECISION_METHOD, parameters)
  }
  const { uncertainty } = table
  if (uncertainty) {
    const measured =
      uncertaintyDistribution ?? distribution(uncertainty, table.count, options.distribution)
    return fromColumn({ ...table, uncertainty }, inputs, options, measured, parameters)
  }
  if (typeof inputs === 'string') {
    const reason = `No uncertainty column, and no expected precision: ${inputs}`
    return notComputable(reason, PRECISION_METHOD, parameters)
  }
  return fromPhotons(table, inputs, options, parameters)
}
