import type { QualityReportDto, QualityVerdictChip } from '../schemas/quality.schema'
import { qualityCards } from './quality-cards'
import { distributionValue, metricOf } from './quality-values'
import { VERDICT_TONES, type Verdict, type VerdictTone } from './quality-verdicts'

/** Short names of the judged aspects, for chips side by side; other cards keep their title. */
const SHORT_TITLES: Record<string, string> = {
  precision: 'Precision',
  nena: 'NeNA',
  frc: 'Resolution',
  drift: 'Drift',
}

/** The worst tone among some verdicts ('good' when there are none). */
export function worstTone(verdicts: Verdict[]): VerdictTone {
  let worst = 0
  for (const v of verdicts) worst = Math.max(worst, VERDICT_TONES.indexOf(v.tone))
  return VERDICT_TONES[worst] ?? 'good'
}

/**
 * A finished report's verdicts in one line: each judged aspect once, in the cards' order, toned
 * by its worst verdict. The same cards (and so the same verdicts) as the quality page shows.
 */
export function verdictChips(report: QualityReportDto): QualityVerdictChip[] {
  return qualityCards(report)
    .filter((card) => card.verdicts.length > 0)
    .map((card) => ({
      key: card.key,
      title: SHORT_TITLES[card.key] ?? card.title,
      tone: worstTone(card.verdicts),
      text: card.verdicts.map((v) => v.text).join(' '),
    }))
}

/** The median of a finished report's sigma column (its fitted PSF SD, nm), or null. */
export function fittedPsfSigmaOf(report: QualityReportDto): number | null {
  if (!report.computedAt) return null
  const median = distributionValue(metricOf(report, 'sigma'))?.median
  return median !== undefined && Number.isFinite(median) && median > 0 ? median : null
}

/**
 * The measured PSF width of a dataset: the median over its tables of each table's median fitted
 * sigma (the middle two averaged), so one odd table does not set it; null when no table has one.
 */
export function datasetPsfSigmaNm(reports: QualityReportDto[]): number | null {
  const widths = reports
    .map(fittedPsfSigmaOf)
    .filter((w): w is number => w !== null)
    .sort((a, b) => a - b)
  if (!widths.length) return null
  const upper = widths[widths.length >> 1]!
  return widths.length % 2 ? upper : (widths[(widths.length >> 1) - 1]! + upper) / 2
}
