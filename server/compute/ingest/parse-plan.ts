/**
 * What to read from each field and how to store it: the mapping turned into output columns
 * ("slots"), in a plain form that can be posted to worker threads.
 */
import {
  COLUMN_ROLES,
  FWHM_PER_SIGMA,
  type ColumnRole,
  type ColumnUnit,
} from '@shared/domain/localization-columns'
import type { ColumnMapping } from '@shared/schemas/localization-mapping.schema'
import type { Delimiter, TableFormat } from './table-format.types'

/**
 * Float32 for positions and widths in nm: its relative rounding error is at most 2^-24 (6e-8), so
 * a coordinate below 1 mm (1e6 nm) moves by less than 0.06 nm, two orders of magnitude below the
 * best localization precision (~1 nm; DOMAIN.md 2). Photons and background keep 7 significant
 * digits, more than their shot noise allows. `other` columns may be identifiers: Float64.
 */
export type StorageKind = 'float32' | 'float64' | 'uint32' | 'uint16'

export interface SlotSpec {
  /** 0-based source field. */
  field: number
  /** Column name in the output. */
  name: string
  /** Column name in the source table, for messages. */
  sourceName: string
  role: ColumnRole
  /** The role the mapping gave, when the slot stores it as another (a FWHM stored as sigma). */
  mappedRole: ColumnRole
  storage: StorageKind
  /** Source value × scale = stored value (unit conversion to nm). */
  scale: number
  /** Subtracted after scaling: the frame base, so stored frames count from 0. */
  offset: number
  /** Empty or NaN rejects the row; otherwise it is stored as NaN. */
  required: boolean
  /** Largest value an integer slot holds. */
  maxValue: number
  sourceUnit: ColumnUnit | null
  /** Unit of the stored values (`nm`, `photons`, `adu`), or null. */
  storedUnit: string | null
}

export interface ParsePlan {
  delimiter: Delimiter
  decimalMark: '.' | ','
  /** Fields every record must have. */
  fieldCount: number
  slots: SlotSpec[]
  /** Frames are read as written, and the base (0 or 1) follows from their minimum afterwards. */
  frameBaseFromData: boolean
  /** Expected mean bytes per record, to size buffers. */
  rowBytesHint: number
}

const REQUIRED_ROLES: readonly ColumnRole[] = ['frame', 'x', 'y', 'z', 'channel']

export function buildParsePlan(mapping: ColumnMapping, format: TableFormat, rowBytesHint: number) {
  const kept = mapping.columns
    .filter((c) => c.role !== 'ignore')
    .sort((a, b) => roleOrder(a.role) - roleOrder(b.role) || a.index - b.index)
  const names = new Set<string>()
  const slots = kept.map((column): SlotSpec => {
    const sourceName = format.header[column.index] ?? `column_${column.index + 1}`
    const role = storedRole(column.role)
    const name = uniqueName(outputName(role, sourceName), names)
    return {
      field: column.index,
      name,
      sourceName,
      role,
      mappedRole: column.role,
      ...storageFor(column, mapping),
    }
  })
  const widest = Math.max(...mapping.columns.map((c) => c.index + 1))
  const plan: ParsePlan = {
    delimiter: format.delimiter,
    decimalMark: format.decimalMark,
    fieldCount: Math.max(format.columnCount, widest),
    slots,
    frameBaseFromData: mapping.frameBase === 'auto',
    rowBytesHint: Math.max(8, rowBytesHint),
  }
  return plan
}

type Storage = Omit<SlotSpec, 'field' | 'name' | 'sourceName' | 'role' | 'mappedRole'>

/** A PSF width given as a FWHM is stored as its standard deviation, which the engines read. */
const storedRole = (role: ColumnRole): ColumnRole => (role === 'fwhm' ? 'sigma' : role)

function storageFor(column: ColumnMapping['columns'][number], mapping: ColumnMapping): Storage {
  const unit = column.unit ?? null
  const width = column.role === 'fwhm' ? 1 / FWHM_PER_SIGMA : 1
  const base = { scale: width, offset: 0, maxValue: Infinity, sourceUnit: unit, storedUnit: unit }
  const required = REQUIRED_ROLES.includes(column.role)
  if (column.role === 'frame') {
    return {
      ...base,
      storage: 'uint32',
      // With `auto`, frames are stored as written and shifted once their minimum is known.
      offset: mapping.frameBase === 'auto' ? 0 : mapping.frameBase,
      maxValue: 2 ** 32 - 1,
      required,
    }
  }
  if (column.role === 'channel') return { ...base, storage: 'uint16', maxValue: 65_535, required }
  if (column.role === 'other') return { ...base, storage: 'float64', required }
  if (unit === 'um')
    return { ...base, storage: 'float32', scale: 1000 * width, storedUnit: 'nm', required }
  if (unit === 'px') {
    return {
      ...base,
      storage: 'float32',
      scale: (mapping.pixelSizeNm ?? NaN) * width,
      storedUnit: 'nm',
      required,
    }
  }
  return { ...base, storage: 'float32', required }
}

function roleOrder(role: ColumnRole) {
  return COLUMN_ROLES.indexOf(role)
}

function outputName(role: ColumnRole, header: string) {
  if (role !== 'other') return role
  const cleaned = header
    .trim()
    .replace(/[^\w.-]+/g, '_')
    .replace(/^_+|_+$/g, '')
  return cleaned || 'other'
}

function uniqueName(name: string, taken: Set<string>) {
  let candidate = name
  for (let n = 2; taken.has(candidate); n++) candidate = `${name}_${n}`
  taken.add(candidate)
  return candidate
}

/** Index of the slot holding `role`, or -1. */
export function slotOf(plan: ParsePlan, role: 'x' | 'y' | 'frame') {
  return plan.slots.findIndex((s) => s.role === role)
}
