import type { QualityReportDto, QualityVerdictChip } from '../schemas/quality.schema'
import { qualityCards } from './quality-cards'
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
