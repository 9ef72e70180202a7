import type { QualityMetric, QualityReportDto } from '../schemas/quality.schema'
import {
  frcValue,
  labellingDensity,
  mergeValue,
  metricOf,
  precisionValue,
  type DensityValue,
} from './quality-values'
import {
  driftVerdict,
  lengthText,
  nenaVerdict,
  precisionVerdict,
  resolutionVerdicts,
  type Verdict,
} from './quality-verdicts'

/** One card of the quality page: a headline value, facts beside it, verdicts and its method. */
export interface QualityCard {
  key: string
  title: string
  /** The headline value with its unit; null when the metric could not be computed. */
  value: string | null
  details: string[]
  verdicts: Verdict[]
  /** Method, parameters and, when not computed, the reason. */
  metric: QualityMetric | null
}

const countFmt = new Intl.NumberFormat(undefined, { maximumFractionDigits: 0 })
const smallFmt = new Intl.NumberFormat(undefined, { maximumFractionDigits: 1 })
const count = (v: number) => countFmt.format(v)
const present = <T>(v: T | null | undefined): v is T => v !== null && v !== undefined
const facts = (...lines: (string | false | null)[]) => lines.filter((l): l is string => !!l)

function summaryCard(r: QualityReportDto): QualityCard {
  return {
    key: 'summary',
    title: 'Localizations',
    value: present(r.localizations) ? count(r.localizations) : null,
    details: facts(
      present(r.frames) && `in ${count(r.frames)} frames`,
      present(r.photonsMedian) && `median ${count(r.photonsMedian)} photons per localization`,
    ),
    verdicts: [],
    metric: metricOf(r, 'summary'),
  }
}

function precisionCard(r: QualityReportDto): QualityCard {
  const metric = metricOf(r, 'precision')
  const p = precisionValue(metric)
  const verdict = p && precisionVerdict(p)
  return {
    key: 'precision',
    title: 'Localization precision',
    value: present(r.precisionMedianNm) ? `${lengthText(r.precisionMedianNm)} (median)` : null,
    details: facts(
      p?.source === 'uncertainty column' && 'from the table’s uncertainty column',
      p?.source === 'expected from photons' && 'expected from the photon counts (no column)',
      present(r.expectedPrecisionNm) &&
        `photon counts predict ${lengthText(r.expectedPrecisionNm)}` +
          (p?.expectedFormula ? ` (${p.expectedFormula})` : ''),
    ),
    verdicts: verdict ? [verdict] : [],
    metric,
  }
}

function nenaCard(r: QualityReportDto): QualityCard {
  const p = precisionValue(metricOf(r, 'precision'))
  const verdict = nenaVerdict({
    nenaNm: r.nenaPrecisionNm,
    precisionNm: r.precisionMedianNm,
    precisionSource: p?.source,
  })
  return {
    key: 'nena',
    title: 'Precision from the data (NeNA)',
    value: present(r.nenaPrecisionNm) ? lengthText(r.nenaPrecisionNm) : null,
    details: [],
    verdicts: verdict ? [verdict] : [],
    metric: metricOf(r, 'nena'),
  }
}

function frcCard(r: QualityReportDto, density: DensityValue | null): QualityCard {
  const spreadNm = frcValue(metricOf(r, 'frc'))?.spreadNm
  return {
    key: 'frc',
    title: 'Resolution (FRC)',
    value: present(r.frcResolutionNm)
      ? lengthText(r.frcResolutionNm) +
        (present(spreadNm) && spreadNm > 0 ? ` ± ${lengthText(spreadNm)}` : '')
      : null,
    details: facts(
      present(r.frcResolutionUncorrectedNm) &&
        present(r.frcResolutionNm) &&
        `${lengthText(r.frcResolutionUncorrectedNm)} before the correction for molecules localized repeatedly`,
      present(r.localizationsPerEmitter) && repeatsText(r.localizationsPerEmitter),
    ),
    verdicts: resolutionVerdicts({
      frcNm: r.frcResolutionNm,
      diffractionNm: r.diffractionLimitNm,
      nyquistNm: density?.nyquistResolutionNm ?? r.nyquistResolutionNm,
      countingUnit: density?.countingUnit,
    }),
    metric: metricOf(r, 'frc'),
  }
}

function driftCard(r: QualityReportDto): QualityCard {
  const verdict = driftVerdict({
    totalDriftNm: r.driftNm,
    precisionNm: r.precisionMedianNm,
    // Both without the repeat correction (see frcDriftCorrectedNm), so they compare like for like.
    frcNm: r.frcResolutionUncorrectedNm,
    frcCorrectedNm: r.frcDriftCorrectedNm,
  })
  return {
    key: 'drift',
    title: 'Drift',
    value: present(r.driftNm) ? `up to ${lengthText(r.driftNm)}` : null,
    details: facts(
      present(r.frcDriftCorrectedNm) &&
        `FRC resolution after correcting it: ${lengthText(r.frcDriftCorrectedNm)}`,
    ),
    verdicts: verdict ? [verdict] : [],
    metric: metricOf(r, 'drift'),
  }
}

function densityCard(r: QualityReportDto): QualityCard {
  const { metric, value } = labellingDensity(r)
  return {
    key: 'density',
    title: 'Labelling density',
    value: value ? `${count(value.densityPerUm2)} per µm²` : null,
    details: value
      ? [
          `counting ${value.countingUnit} over ${smallFmt.format(value.occupiedAreaUm2)} µm² occupied`,
          `Nyquist resolution ${lengthText(value.nyquistResolutionNm)}`,
        ]
      : [],
    verdicts: [],
    metric,
  }
}

function mergeCard(r: QualityReportDto): QualityCard {
  const metric = metricOf(r, 'merge')
  const merged = mergeValue(metric)
  const mean = merged?.localizationsPerEvent.mean
  return {
    key: 'merge',
    title: 'Molecules (merged events)',
    value: present(r.mergedEmitters) ? count(r.mergedEmitters) : null,
    details: facts(present(mean) && `${smallFmt.format(mean)} localizations per event on average`),
    verdicts: [],
    metric,
  }
}

function diffractionCard(r: QualityReportDto): QualityCard {
  return {
    key: 'diffraction',
    title: 'Diffraction limit',
    value: present(r.diffractionLimitNm) ? lengthText(r.diffractionLimitNm) : null,
    details: present(r.diffractionLimitNm) ? ['Abbe, from the emission wavelength and NA'] : [],
    verdicts: [],
    metric: metricOf(r, 'diffraction'),
  }
}

/** The cards of a finished report, in the order a reader judges a table by. */
export function qualityCards(report: QualityReportDto): QualityCard[] {
  const density = labellingDensity(report).value
  return [
    summaryCard(report),
    precisionCard(report),
    nenaCard(report),
    frcCard(report, density),
    driftCard(report),
    densityCard(report),
    mergeCard(report),
    diffractionCard(report),
  ]
}

/**
 * Q of the repeat correction read as localizations per molecule; below 1 it cannot be a count
 * (drift or fine structure spoil the plateau it is read from), so it is given as Q and said so.
 */
function repeatsText(q: number): string {
  return q >= 1
    ? `about ${smallFmt.format(q)} localizations per molecule`
    : `repeat factor Q ≈ ${smallFmt.format(q)}: too low to count localizations per molecule (drift or fine structure spoil its estimate)`
}
