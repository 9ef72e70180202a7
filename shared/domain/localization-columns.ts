/**
 * Columns of a localization table (one row per localization): what each column means (its role),
 * its unit, and a first guess at both from the header. Used by the server's ingest and by the
 * column-mapping dialog.
 */

// prettier-ignore
export const COLUMN_ROLES = [
  'frame', 'x', 'y', 'z', 'photons', 'background', 'sigmaX', 'sigmaY', 'sigma',
  'uncertainty', 'uncertaintyX', 'uncertaintyY', 'uncertaintyZ', 'channel', 'other', 'ignore',
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
  'x', 'y', 'z', 'sigmaX', 'sigmaY', 'sigma', 'uncertainty', 'uncertaintyX', 'uncertaintyY', 'uncertaintyZ',
]
export const INTENSITY_ROLES: readonly ColumnRole[] = ['photons', 'background']
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

const axis = (a: string) =>
  `${a} ${a}pos pos${a} ${a}position position${a} ${a}c ${a}coord ${a}coordinate ${a}0 ${a}loc loc${a}`
const width = (a: string) =>
  `sigma${a} s${a} psfsigma${a} sigmapsf${a} ${a}sigma width${a} ${a}width psfwidth${a}`
const precision = (a: string) =>
  `uncertainty${a} precision${a} locprecision${a} crlb${a} sigmaloc${a} lp${a} ${a}uncertainty ${a}precision`

/**
 * Header stems (lower case, separators removed) and the role each names. Deliberately absent:
 * `offset` (a camera baseline or a shift, never the background), `time` (seconds, not frames),
 * `amplitude` (a peak height, not the photon sum).
 */
const SYNONYMS: Partial<Record<ColumnRole, string>> = {
  frame: 'frame frames t frameno framenumber framenr frameindex frameidx framenum',
  ...{ x: axis('x'), y: axis('y'), z: axis('z') },
  photons:
    'photons photon nphotons numphotons photoncount photoncounts totalphotons intensity signal',
  background: 'bg background bkg bkgd backgroundphotons bgphotons',
  sigma: 'sigma psfsigma sigmapsf width psfwidth sigmaxy',
  ...{ sigmaX: width('x'), sigmaY: width('y') },
  uncertainty:
    'uncertainty precision locprecision localizationprecision localisationprecision crlb ' +
    'uncertaintyxy sigmaloc locuncertainty lp',
  ...{ uncertaintyX: precision('x'), uncertaintyY: precision('y'), uncertaintyZ: precision('z') },
  channel: 'channel ch chan channelid channelindex probe',
}
const ROLE_OF_STEM = new Map<string, ColumnRole>()
for (const role of COLUMN_ROLES) {
  for (const stem of SYNONYMS[role]?.split(' ') ?? []) ROLE_OF_STEM.set(stem, role)
}

export interface ParsedHeaderName {
  /** null when the name is not one we know. */
  role: ColumnRole | null
  unit: ColumnUnit | null
  /** The unit as written when one was stated that we do not read (`mm`, `s`). */
  unknownUnit: string | null
}

const BRACKETED = /^(.*?)\s*[[({]\s*([^\])}]*?)\s*[\])}]\s*$/
const SEPARATORS = /[\s_\-./]+/

/**
 * Role and unit from a column name, case-insensitively. The unit may be bracketed (`x [nm]`,
 * `x (px)`, `x {um}`, `X (µm)`) or the last word after a separator (`x_nm`, `x-nm`, `x nm`,
 * `x.nm`, `x / nm`). Units glued to the name (`xnm`, `xnano`) are not read.
 */
export function parseHeaderName(name: string): ParsedHeaderName {
  const text = name.trim().replace(/^"|"$/g, '').toLowerCase().replace(/[µμ]/g, 'u')
  const bracketed = BRACKETED.exec(text)
  let unitText = bracketed ? (bracketed[2] ?? '') : null
  const words = (bracketed ? (bracketed[1] ?? '') : text).split(SEPARATORS).filter(Boolean)
  const last = words.at(-1)
  // A last word that is a unit names the unit, unless the whole name is one we know (n_photons).
  const known = ROLE_OF_STEM.has(words.join(''))
  if (unitText === null && !known && words.length > 1 && last && UNIT_WORDS.has(last)) {
    unitText = last
    words.pop()
  }
  const unit = unitText ? (UNIT_WORDS.get(unitText) ?? null) : null
  const role = ROLE_OF_STEM.get(words.join('')) ?? null
  return { role, unit, unknownUnit: unitText && !unit ? unitText : null }
}

export interface SuggestedColumn {
  index: number
  name: string
  role: ColumnRole
  unit: ColumnUnit | null
}
export interface MappingSuggestion {
  columns: SuggestedColumn[]
  /** 1 unless a sampled frame number is 0. */
  frameBase: 0 | 1
  /** x and y found once each, in nm or µm, and no role claimed twice: usable without asking. */
  confident: boolean
  problems: string[]
}

/**
 * A first mapping from the header (and, when given, the first rows). Unknown numeric columns are
 * kept as `other`, unknown text columns ignored. Widths without a unit take the unit of x, photon
 * and background columns without one are taken as photons: one table, one convention (common
 * practice).
 */
export function suggestMapping(header: string[], sampleRows: string[][] = []): MappingSuggestion {
  const problems: string[] = []
  let blocked = false
  const owner = new Map<ColumnRole, SuggestedColumn>()
  const columns = header.map((name, index) => {
    const column = readColumn(name, index, sampleRows, problems)
    const first = owner.get(column.role)
    if (first && !REPEATABLE_ROLES.includes(column.role)) {
      problems.push(
        `"${first.name}" and "${name}" both look like ${column.role}; the first is used`,
      )
      blocked = true
      return { ...column, role: 'other' as const, unit: null }
    }
    owner.set(column.role, column)
    return column
  })
  for (const role of ['x', 'y'] as const)
    blocked = checkAxis(owner.get(role), role, problems) || blocked
  fillDefaultUnits(columns, owner.get('x')?.unit ?? null)
  const frame = owner.get('frame')
  const frameBase = frame && sampleRows.some((row) => Number(row[frame.index]) === 0) ? 0 : 1
  return { columns, frameBase, confident: !blocked, problems }
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
  return { index, name, role, unit }
}

function checkAxis(column: SuggestedColumn | undefined, axis: 'x' | 'y', problems: string[]) {
  if (!column) {
    problems.push(
      `No column looks like ${axis} (names such as "${axis}", "${axis} [nm]", "${axis}_px")`,
    )
  } else if (!column.unit) {
    problems.push(`The unit of "${column.name}" is not stated (nm, µm or px)`)
  } else if (column.unit === 'px') {
    problems.push(`"${column.name}" is in camera pixels: the pixel size in nm is needed`)
  } else return false
  return true
}

function fillDefaultUnits(columns: SuggestedColumn[], lengthUnit: ColumnUnit | null) {
  for (const column of columns) {
    if (column.unit) continue
    const kind = unitKindOf(column.role)
    if (kind === 'length') column.unit = lengthUnit
    else if (kind === 'intensity') column.unit = 'photons'
  }
}

const NUMBER_LIKE = /^[+-]?(\d+[.,]?\d*|[.,]\d+)([eE][+-]?\d+)?$|^[+-]?(nan|inf|infinity)$|^$/i
function isNumericColumn(sample: string[][], index: number): boolean {
  return sample.every((row) => NUMBER_LIKE.test((row[index] ?? '').trim()))
}
