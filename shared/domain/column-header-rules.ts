/**
 * How localization tables name their columns, as data: each rule lists header spellings (lower
 * case, separators removed, `µ` as `u`) with the role they name, a unit glued to the name when
 * there is one, and how sure the name alone is. Gathered from the spellings that localization
 * software commonly writes; `suggestMapping` (localization-columns.ts) applies them.
 */
import type { ColumnRole, ColumnUnit } from './localization-columns'

/**
 * `sure`: the name alone says it. `ask`: a best guess the depositor confirms (the question says
 * why). `whole numbers`: sure when the sampled values are all integers, else asked.
 */
export type HeaderConfidence = 'sure' | 'ask' | 'whole numbers'

export interface HeaderRule {
  role: ColumnRole
  /** Space-separated spellings. */
  spellings: string
  /** A unit written into the name itself (`xnm`, `locprecnm`). */
  unit?: ColumnUnit
  /** Default `sure`. */
  confidence?: HeaderConfidence
  /** Why the name is not enough, shown to the depositor (`{name}` is the header). */
  question?: string
  /** A drift-corrected position, preferred over a raw one in the same table. */
  corrected?: boolean
  /** Only with a stated photon unit; otherwise the name means something else. */
  photonUnitOnly?: boolean
}

const axis = (a: string) =>
  `${a} ${a}pos pos${a} ${a}position position${a} ${a}coord ${a}coordinate ${a}0 ${a}loc loc${a}`
const corrected = (a: string) =>
  `${a}c ${a}corr ${a}corrected ${a}driftcorrected ${a}driftcorr ${a}dc corrected${a}`
const width = (a: string) =>
  `sigma${a} s${a} psfsigma${a} sigmapsf${a} ${a}sigma width${a} ${a}width psfwidth${a}`
const precision = (a: string) =>
  `uncertainty${a} precision${a} locprecision${a} crlb${a} sigmaloc${a} lp${a} ${a}uncertainty ` +
  `${a}precision locprec${a}`

/**
 * Deliberately absent: `time` (seconds, not frames; see TIME_SPELLINGS), `amplitude` (a peak
 * height, not the photon sum), and `offset` without a photon unit (a camera baseline or a shift).
 */
export const HEADER_RULES: readonly HeaderRule[] = [
  {
    role: 'frame',
    spellings:
      'frame frames frameno framenumber framenr frameindex frameidx framenum frameix firstframe',
  },
  {
    role: 'frame',
    spellings: 't',
    confidence: 'whole numbers',
    question: '"{name}" may be a frame number or a time in seconds',
  },
  ...(['x', 'y', 'z'] as const).flatMap((a): HeaderRule[] => [
    { role: a, spellings: axis(a) },
    { role: a, spellings: corrected(a), corrected: true },
    { role: a, spellings: `${a}nm ${a}nano`, unit: 'nm' },
  ]),
  {
    role: 'photons',
    spellings:
      'photons photon nphotons numphotons photoncount photoncounts totalphotons intensity ' +
      'signal numberofphotons phot nphot',
  },
  { role: 'background', spellings: 'bg background bkg bkgd backgroundphotons bgphotons' },
  { role: 'background', spellings: 'offset', photonUnitOnly: true },
  {
    role: 'backgroundSd',
    spellings: 'bkgstd bgstd bgsd bkgsd backgroundstd backgroundsd backgroundnoise bgnoise',
  },
  { role: 'sigma', spellings: 'sigma psfsigma sigmapsf sigmaxy' },
  {
    role: 'sigma',
    spellings: 'width psfwidth',
    confidence: 'ask',
    question: '"{name}" may be a standard deviation (sigma) or a full width at half maximum (FWHM)',
  },
  { role: 'fwhm', spellings: 'fwhm psffwhm fwhmpsf' },
  { role: 'sigmaX', spellings: `${width('x')} sigma1` },
  { role: 'sigmaY', spellings: `${width('y')} sigma2` },
  {
    role: 'uncertainty',
    spellings:
      'uncertainty precision locprecision localizationprecision localisationprecision crlb ' +
      'uncertaintyxy sigmaloc locuncertainty lp locprec laterallocalizationaccuracy ' +
      'localizationaccuracy lateralaccuracy',
  },
  { role: 'uncertainty', spellings: 'locprecnm', unit: 'nm' },
  { role: 'uncertaintyX', spellings: precision('x') },
  { role: 'uncertaintyY', spellings: precision('y') },
  { role: 'uncertaintyZ', spellings: precision('z') },
  { role: 'channel', spellings: 'channel ch chan channelid channelindex probe' },
]

/** Names of a time column: never read as frames, but said so when no frame column is found. */
export const TIME_SPELLINGS = 'time t timestamp times'
/** Units that make a column a time. */
export const TIME_UNITS = 's sec secs second seconds ms msec millisecond milliseconds'

const RULE_OF_SPELLING = new Map<string, HeaderRule>()
for (const rule of HEADER_RULES) {
  for (const spelling of rule.spellings.split(' ')) {
    if (RULE_OF_SPELLING.has(spelling)) throw new Error(`Header spelling twice: ${spelling}`)
    RULE_OF_SPELLING.set(spelling, rule)
  }
}

/** The rule for a header stem (lower case, separators removed), if any. */
export function headerRuleOf(stem: string): HeaderRule | undefined {
  return RULE_OF_SPELLING.get(stem)
}
