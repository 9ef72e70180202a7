/**
 * Plain-language verdicts on a table's quality metrics. Each compares one measured number with
 * what would be expected of it (photon statistics, the diffraction limit, the labelling density,
 * the table’s own precision) and says what a difference usually means. Pure functions of numbers.
 */

/** From the best to the worst; 'note' says something is unusual without judging it. */
export const VERDICT_TONES = ['good', 'note', 'fair', 'poor'] as const
export type VerdictTone = (typeof VERDICT_TONES)[number]

/** What each tone is called beside its verdict, on the page and in the printed report. */
export const VERDICT_TONE_LABELS: Record<VerdictTone, string> = {
  good: 'Good',
  note: 'Note',
  fair: 'Worth a look',
  poor: 'A problem',
}

export interface Verdict {
  tone: VerdictTone
  text: string
}

const oneDecimal = new Intl.NumberFormat(undefined, { maximumFractionDigits: 1 })
const twoDecimals = new Intl.NumberFormat(undefined, { maximumFractionDigits: 2 })

/** A length as the page shows it: nm below 1 µm, µm above. */
export function lengthText(nm: number | null | undefined): string {
  if (nm === null || nm === undefined || !Number.isFinite(nm)) return '—'
  if (Math.abs(nm) >= 1000) return `${twoDecimals.format(nm / 1000)} µm`
  return `${oneDecimal.format(nm)} nm`
}

export const timesText = (ratio: number) => `${oneDecimal.format(ratio)} times`

// Within 30 % of a prediction counts as agreeing: the photon-count formulas assume an ideal
// in-focus PSF, which real data miss by about that much (DOMAIN.md §6, PSF width).
const AGREES = 1.3
const WORSE = 2

const CAUSES = 'defocus, PSF mismatch or residual drift are common causes'

/** The table's precision against the precision its photon counts predict. */
export function precisionVerdict(p: {
  measuredToExpected: number | null
  expectedMedianNm?: number | null
}): Verdict | null {
  const ratio = p.measuredToExpected
  if (ratio === null || !Number.isFinite(ratio) || ratio <= 0) return null
  const predicted =
    p.expectedMedianNm === null || p.expectedMedianNm === undefined
      ? ''
      : ` (they predict ${lengthText(p.expectedMedianNm)})`
  if (ratio < 1 / AGREES)
    return {
      tone: 'note',
      text:
        `Better than the photon counts predict${predicted}: the uncertainty column may come ` +
        'from a different formula, or be optimistic.',
    }
  if (ratio <= AGREES)
    return { tone: 'good', text: `As good as the photon counts allow${predicted}.` }
  const times = timesText(ratio)
  if (ratio <= WORSE)
    return {
      tone: 'fair',
      text: `Somewhat worse than photon statistics predict${predicted}, ${times} the prediction (${CAUSES}).`,
    }
  return {
    tone: 'poor',
    text: `Much worse than photon statistics predict${predicted}, ${times} the prediction (${CAUSES}).`,
  }
}

export interface ResolutionInputs {
  frcNm: number | null
  diffractionNm: number | null
  nyquistNm: number | null
  /** What the density counted: 'raw localizations' or 'merged events'. */
  countingUnit?: string | null
}

const usable = (v: number | null | undefined): v is number =>
  v !== null && v !== undefined && Number.isFinite(v) && v > 0

/** The FRC resolution against the diffraction limit and the Nyquist limit of the density. */
export function resolutionVerdicts(r: ResolutionInputs): Verdict[] {
  if (!usable(r.frcNm)) return []
  const verdicts: Verdict[] = []
  if (usable(r.diffractionNm)) verdicts.push(diffractionVerdict(r.frcNm, r.diffractionNm))
  if (usable(r.nyquistNm)) verdicts.push(nyquistVerdict(r.frcNm, r.nyquistNm, r.countingUnit))
  return verdicts
}

function diffractionVerdict(frcNm: number, diffractionNm: number): Verdict {
  const limit = `the diffraction limit (${lengthText(diffractionNm)})`
  if (frcNm >= diffractionNm)
    return {
      tone: 'poor',
      text: `No finer than ${limit}: the image resolves no more than a widefield image would.`,
    }
  return { tone: 'good', text: `${timesText(diffractionNm / frcNm)} finer than ${limit}.` }
}

function nyquistVerdict(frcNm: number, nyquistNm: number, unit?: string | null): Verdict {
  const merged = unit === 'merged events'
  const blinking = merged
    ? 'Even after merging, molecules that blink again later are counted more than once, which ' +
      'inflates the density: the true Nyquist limit is likely coarser.'
    : 'Blinking inflates the density count (a molecule localized several times counts several ' +
      'times): the true Nyquist limit is coarser.'
  if (nyquistNm > frcNm)
    return {
      tone: 'fair',
      text:
        'Labelling density, not precision, limits the resolution: at this density the Nyquist ' +
        `criterion allows no finer than ${lengthText(nyquistNm)}. ${blinking}`,
    }
  return {
    tone: 'good',
    text:
      'The labelling density supports this resolution (its Nyquist limit is ' +
      `${lengthText(nyquistNm)}). ${blinking}`,
  }
}

// Drift below the precision does not blur; up to 3× it widens the blur noticeably; beyond, the
// drift dominates the image (a rule of thumb, not a published threshold).
const DRIFT_FAIR = 3

/** The largest drift against the precision, and the FRC before and after correcting it. */
export function driftVerdict(d: {
  totalDriftNm: number | null
  precisionNm: number | null
  frcNm?: number | null
  frcCorrectedNm?: number | null
}): Verdict | null {
  if (d.totalDriftNm === null || !Number.isFinite(d.totalDriftNm)) return null
  const drift = `The sample drifted up to ${lengthText(d.totalDriftNm)} during the acquisition`
  const after =
    usable(d.frcNm) && usable(d.frcCorrectedNm)
      ? ` Corrected for this drift, the FRC resolution is ${lengthText(d.frcCorrectedNm)} ` +
        `(${lengthText(d.frcNm)} as deposited).`
      : ''
  if (!usable(d.precisionNm)) return { tone: 'note', text: `${drift}.${after}` }
  const precision = `the localization precision (${lengthText(d.precisionNm)})`
  if (d.totalDriftNm <= d.precisionNm)
    return {
      tone: 'good',
      text: `${drift}, no more than ${precision}: it does not blur the image.${after}`,
    }
  return {
    tone: d.totalDriftNm <= DRIFT_FAIR * d.precisionNm ? 'fair' : 'poor',
    text: `${drift}, ${timesText(d.totalDriftNm / d.precisionNm)} ${precision}: uncorrected, it blurs the image.${after}`,
  }
}

/** NeNA's precision from the data against the precision the table states (or predicts). */
export function nenaVerdict(n: {
  nenaNm: number | null
  precisionNm: number | null
  /** 'uncertainty column' or 'expected from photons'. */
  precisionSource?: string | null
}): Verdict | null {
  if (!usable(n.nenaNm) || !usable(n.precisionNm)) return null
  const stated =
    n.precisionSource === 'expected from photons'
      ? `the precision the photon counts predict (${lengthText(n.precisionNm)})`
      : `the table’s own precision (${lengthText(n.precisionNm)})`
  const ratio = n.nenaNm / n.precisionNm
  if (ratio < 1 / AGREES)
    return { tone: 'note', text: `Finer than ${stated}: the stated precision may be cautious.` }
  if (ratio <= AGREES)
    return { tone: 'good', text: `Agrees with ${stated}: the stated precision is believable.` }
  return {
    tone: ratio <= WORSE ? 'fair' : 'poor',
    text:
      `Coarser than ${stated}, ${timesText(ratio)} it: the stated precision may be optimistic, or residual ` +
      'drift and sample motion widen the distances between neighbours.',
  }
}
