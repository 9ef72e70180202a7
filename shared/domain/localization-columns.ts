/**
 * Columns of a localization table (one row per localization): what each column means (its role),
 * its unit, and a first guess at both from the header. Used by the server's ingest and by the
 * column-mapping dialog.
 */

import {
  TIME_SPELLINGS,
  TIME_UNITS,
  headerRuleOf,
  type HeaderConfidence,
} from './column-header-rules'

// prettier-ignore
export const COLUMN_ROLES = [
  'frame', 'x', 'y', 'z', 'photons', 'background', 'backgroundSd', 'sigmaX', 'sigmaY', 'sigma',
  'fwhm', 'uncertainty', 'uncertaintyX', 'uncertaintyY', 'uncertaintyZ', 'channel', 'other',
  'ignore',
] as const
export type ColumnRole = (typeof COLUMN_ROLES)[number]

export const LENGTH_UNITS = ['nm', 'um', 'px'] as const
export type LengthUnit = (typeof LENGTH_UNITS)[number]
/** `photons`: detected photoelectrons, what SMLM tables normally report (DOMAIN.md 1.3). */
export const INTENSITY_UNITS = ['photons', 'adu'] as const
export type IntensityUnit = (typeof INTENSITY_UNITS)[number]
export const COLUMN_UNITS = [...LENGTH_UNITS, ...INTENSITY_UNITS] as const
export type ColumnUnit = (typeof COLUMN_UNITS)[number]

/** Positions and widths: nm, µm or camera pixels. */
// prettier-ignore
export const LENGTH_ROLES: readonly ColumnRole[] = [
  'x', 'y', 'z', 'sigmaX', 'sigmaY', 'sigma', 'fwhm', 'uncertainty', 'uncertaintyX', 'uncertaintyY',
  'uncertaintyZ',
]
/** `background`: the fitted level per pixel (b² of DOMAIN.md 1.1); `backgroundSd`: its SD b. */
export const INTENSITY_ROLES: readonly ColumnRole[] = ['photons', 'background', 'backgroundSd']
/** The PSF width is given once: as a standard deviation or as a FWHM (stored as sigma). */
export const PSF_WIDTH_ROLES: readonly ColumnRole[] = ['sigma', 'fwhm']
/** FWHM = 2√(2 ln 2)·σ (DOMAIN.md 1.2). */
export const FWHM_PER_SIGMA = 2 * Math.sqrt(2 * Math.LN2)

/**
 * Whether frames count from 0 or 1; `auto`: from the whole frame column's minimum, which the
 * ingest knows (0 → from 0, else from 1). A sample of the first rows may lack frame 0.
 */
export const FRAME_BASES = [0, 1, 'auto'] as const
export type FrameBase = (typeof FRAME_BASES)[number]

/** Roles several columns may share; every other role belongs to one column at most. */
export const REPEATABLE_ROLES: readonly ColumnRole[] = ['other', 'ignore']

export type UnitKind = 'length' | 'intensity'
export function unitKindOf(role: ColumnRole): UnitKind | null {
  if (LENGTH_ROLES.includes(role)) return 'length'
  return INTENSITY_ROLES.includes(role) ? 'intensity' : null
}
export function unitFits(role: ColumnRole, unit: ColumnUnit): boolean {
  const kind = unitKindOf(role)
  if (kind === 'length') return (LENGTH_UNITS as readonly string[]).includes(unit)
  return kind === 'intensity' && (INTENSITY_UNITS as readonly string[]).includes(unit)
}

/** Unit spellings, after `µ`/`μ` became `u`. ADU are also written as (camera) counts. */
const UNIT_SPELLINGS: Record<ColumnUnit, string> = {
  nm: 'nm nanometer nanometers nanometre nanometres',
  um: 'um micron microns micrometer micrometers micrometre micrometres',
  px: 'px pix pixel pixels',
  photons: 'photon photons electron electrons e- photoelectrons',
  adu: 'adu count counts',
}
const UNIT_WORDS = new Map<string, ColumnUnit>()
for (const unit of COLUMN_UNITS) {
  for (const word of UNIT_SPELLINGS[unit].split(' ')) UNIT_WORDS.set(word, unit)
}

export interface ParsedHeaderName {
  /** null when the name is not one we know. */
  role: ColumnRole | null
  unit: ColumnUnit | null
  /** The unit as written when one was stated that we do not read (`mm`). */
  unknownUnit: string | null
  /** `ask`: the name alone does not settle the role (see `question`). */
  confidence: HeaderConfidence
  question: string | null
  /** A drift-corrected position (`xc`, `x_corr`). */
  corrected: boolean
  /** A time column (`time`, `t [s]`), which is never a frame number. */
  time: boolean
}

const BRACKETED = /^(.*?)\s*[[({]\s*([^\])}]*?)\s*[\])}]\s*$/
const SEPARATORS = /[\s_\-./]+/
const TIME_STEMS = new Set(TIME_SPELLINGS.split(' '))
const TIME_UNIT_WORDS = new Set(TIME_UNITS.split(' '))
const isUnitWord = (word: string) => UNIT_WORDS.has(word) || TIME_UNIT_WORDS.has(word)

/**
 * Role, unit and confidence from a column name, case-insensitively, by the rules of
 * column-header-rules.ts. The unit may be bracketed (`x [nm]`, `x (px)`, `X (µm)`), the last word
 * after a separator (`x_nm`, `x / nm`), or glued where a rule lists it (`xnm`, `locprecnm`).
 */
export function parseHeaderName(name: string): ParsedHeaderName {
  const text = name.trim().replace(/^"|"$/g, '').toLowerCase().replace(/[µμ]/g, 'u')
  const bracketed = BRACKETED.exec(text)
  let unitText = bracketed ? (bracketed[2] ?? '') : null
  const words = (bracketed ? (bracketed[1] ?? '') : text).split(SEPARATORS).filter(Boolean)
  const last = words.at(-1)
  // A last word that is a unit names the unit, unless the whole name is one we know (n_photons).
  const known = headerRuleOf(words.join('')) !== undefined
  if (unitText === null && !known && words.length > 1 && last && isUnitWord(last)) {
    unitText = last
    words.pop()
  }
  const stem = words.join('')
  const rule = headerRuleOf(stem)
  const timeUnit = unitText !== null && TIME_UNIT_WORDS.has(unitText)
  const unit = unitText ? (UNIT_WORDS.get(unitText) ?? null) : (rule?.unit ?? null)
  const unknown = unitText && !unit && !timeUnit ? unitText : null
  const time = timeUnit || (TIME_STEMS.has(stem) && rule?.confidence !== 'whole numbers')
  // `offset` is the fitted background only when it is stated in photons.
  const role = time || (rule?.photonUnitOnly && unit !== 'photons') ? null : (rule?.role ?? null)
  return {
    role,
    unit,
    unknownUnit: unknown,
    confidence: role ? (rule?.confidence ?? 'sure') : 'sure',
    question: role && rule?.question ? rule.question.replace('{name}', name) : null,
    corrected: Boolean(role && rule?.corrected),
    time,
  }
}

export interface SuggestedColumn {
  index: number
  name: string
  role: ColumnRole
  unit: ColumnUnit | null
}
export interface MappingSuggestion {
  columns: SuggestedColumn[]
  /** `auto` lets the ingest decide from the whole frame column. */
  frameBase: FrameBase
  /** x and y found once each, in nm or µm, and nothing left to ask: usable without asking. */
  confident: boolean
  /** Questions for the depositor; any of them stops the automatic ingest. */
  problems: string[]
  /** What the suggestion chose where the header offered a choice (shown, not asked). */
  notes: string[]
}

interface Candidate extends SuggestedColumn {
  corrected: boolean
  confidence: HeaderConfidence
}

/**
 * A first mapping from the header (and, when given, the first rows). Unknown numeric columns are
 * kept as `other`, unknown text columns ignored. Widths without a unit take the unit of x, photon
 * and background columns without one are taken as photons: one table, one convention (common
 * practice); z without a unit is nm even beside x in pixels (axial positions are written in nm).
 */
export function suggestMapping(header: string[], sampleRows: string[][] = []): MappingSuggestion {
  const problems: string[] = []
  const notes: string[] = []
  const parsed = header.map((name, index) => readColumn(name, index, sampleRows, problems))
  const columns = settleClaims(parsed, problems, notes)
  const byRole = (role: ColumnRole) => columns.find((c) => c.role === role)
  checkDuplicateNames(header, problems)
  for (const role of ['x', 'y'] as const) checkAxis(byRole(role), role, problems)
  fillDefaultUnits(columns, byRole('x')?.unit ?? null, notes)
  for (const column of columns.filter((c) => c.unit === 'px'))
    problems.push(`"${column.name}" is in camera pixels: the pixel size in nm is needed`)
  const time = parsed.find((c) => c.time)
  if (time && !byRole('frame')) {
    problems.push(
      `"${time.name}" is a time, not a frame number, and no column gives the frame: choose the frame column, or confirm that the table has none`,
    )
  }
  const plain = columns.map(({ index, name, role, unit }) => ({ index, name, role, unit }))
  return { columns: plain, frameBase: 'auto', confident: problems.length === 0, problems, notes }
}

function readColumn(name: string, index: number, sample: string[][], problems: string[]) {
  const parsed = parseHeaderName(name)
  let role: ColumnRole = parsed.role ?? (isNumericColumn(sample, index) ? 'other' : 'ignore')
  let unit = parsed.unit
  if (parsed.unknownUnit)
    problems.push(`"${name}": the unit "${parsed.unknownUnit}" is not one we read`)
  if ((role === 'frame' || role === 'channel') && (parsed.unit || parsed.unknownUnit)) {
    problems.push(`"${name}" carries a unit, so it is not taken as a ${role} number`)
    role = 'other'
  }
  if (unit && !unitFits(role, unit)) {
    if (parsed.role) problems.push(`"${name}": ${unit} is not a unit for ${role}`)
    unit = null
  }
  let confidence = parsed.confidence
  if (confidence === 'whole numbers') {
    confidence = wholeNumbers(sample, index) ? 'sure' : 'ask'
    if (confidence === 'ask') role = 'other'
  }
  if (confidence === 'ask' && parsed.question) {
    const guess = role === 'other' ? 'it is kept as another column' : `it is taken as ${role}`
    problems.push(`${parsed.question}: ${guess} until you say which`)
  }
  const column: Candidate & { time: boolean } = {
    ...{ index, name, role, unit, confidence },
    ...{ corrected: parsed.corrected, time: parsed.time },
  }
  return column
}

/** The one role of a set of columns that must not share it (sigma and FWHM are one width). */
const claimOf = (role: ColumnRole) => (PSF_WIDTH_ROLES.includes(role) ? 'psf width' : role)

/**
 * Several columns claiming one role: a single drift-corrected position beats raw ones (said in a
 * note); anything else is asked, the first column keeping the role meanwhile.
 */
function settleClaims(columns: Candidate[], problems: string[], notes: string[]): Candidate[] {
  const claims = new Map<string, Candidate[]>()
  for (const c of columns) {
    if (REPEATABLE_ROLES.includes(c.role)) continue
    claims.set(claimOf(c.role), [...(claims.get(claimOf(c.role)) ?? []), c])
  }
  const demoted = new Set<Candidate>()
  for (const claim of claims.values()) {
    if (claim.length < 2) continue
    const fixed = claim.filter((c) => c.corrected)
    const [first, ...rest] = fixed.length > 0 ? fixed : claim
    if (!first) continue
    const losers = claim.filter((c) => c !== first)
    losers.forEach((c) => demoted.add(c))
    const names = (cs: Candidate[]) => cs.map((c) => `"${c.name}"`).join(' and ')
    if (fixed.length === 1) {
      const kept = losers.length > 1 ? 'are kept as other columns' : 'is kept as another column'
      notes.push(
        `${names([first])} looks drift-corrected and is used as ${first.role}; ${names(losers)} ${kept}`,
      )
    } else if (fixed.length > 1) {
      problems.push(
        `${names(fixed)} all look like drift-corrected ${first.role}: say which one is ${first.role} (${names([first])} is used meanwhile)`,
      )
    } else {
      const all = rest.length > 1 ? 'all' : 'both'
      problems.push(`${names(claim)} ${all} look like ${first.role}; the first is used`)
    }
  }
  return columns.map((c) => (demoted.has(c) ? { ...c, role: 'other' as const, unit: null } : c))
}

function checkDuplicateNames(header: string[], problems: string[]) {
  const seen = new Map<string, number>()
  header.forEach((name, index) => {
    const key = name.trim().toLowerCase()
    const first = seen.get(key)
    if (first === undefined) seen.set(key, index)
    else
      problems.push(
        `Columns ${first + 1} and ${index + 1} are both named "${name.trim()}": say which is which`,
      )
  })
}

function checkAxis(column: SuggestedColumn | undefined, axis: 'x' | 'y', problems: string[]) {
  if (!column) {
    problems.push(
      `No column looks like ${axis} (names such as "${axis}", "${axis} [nm]", "${axis}_px")`,
    )
  } else if (!column.unit) {
    problems.push(`The unit of "${column.name}" is not stated (nm, µm or px)`)
  }
}

function fillDefaultUnits(
  columns: SuggestedColumn[],
  lengthUnit: ColumnUnit | null,
  notes: string[],
) {
  for (const column of columns) {
    if (column.unit) continue
    const kind = unitKindOf(column.role)
    if (column.role === 'z' && lengthUnit === 'px') {
      column.unit = 'nm'
      notes.push(
        `"${column.name}" has no unit and is taken as nm: axial positions are written in nm, a z in pixels says so in its name`,
      )
    } else if (kind === 'length') column.unit = lengthUnit
    else if (kind === 'intensity') column.unit = 'photons'
  }
}

const NUMBER_LIKE = /^[+-]?(\d+[.,]?\d*|[.,]\d+)([eE][+-]?\d+)?$|^[+-]?(nan|inf|infinity)$|^$/i
function isNumericColumn(sample: string[][], index: number): boolean {
  return sample.every((row) => NUMBER_LIKE.test((row[index] ?? '').trim()))
}

const WHOLE_NUMBER = /^[+-]?\d+(\.0*)?$/
/** Every sampled value an integer (and at least one sampled). */
function wholeNumbers(sample: string[][], index: number): boolean {
  return sample.length > 0 && sample.every((row) => WHOLE_NUMBER.test((row[index] ?? '').trim()))
}
