import {
  INTENSITY_UNITS,
  LENGTH_UNITS,
  unitFits,
  unitKindOf,
  type ColumnRole,
  type ColumnUnit,
  type FrameBase,
} from '@shared/domain/localization-columns'
import {
  columnMappingSchema,
  type ColumnMapping,
} from '@shared/schemas/localization-mapping.schema'
import { tableReportOf, type FileValidation } from '@/api/files'
import { parseNumberInput } from './numberInput'

/** One column of the table as the mapping dialog edits it. */
export interface MappingRow {
  index: number
  name: string
  role: ColumnRole
  unit: ColumnUnit | null
}

export interface MappingDraft {
  rows: MappingRow[]
  frameBase: FrameBase
  /** As typed. */
  pixelSize: string
}

export const ROLE_LABELS: Record<ColumnRole, string> = {
  frame: 'frame',
  x: 'x',
  y: 'y',
  z: 'z',
  photons: 'photons',
  background: 'background level',
  backgroundSd: 'background SD (noise)',
  sigma: 'sigma (PSF width)',
  fwhm: 'FWHM (PSF width, stored as sigma)',
  sigmaX: 'sigma x',
  sigmaY: 'sigma y',
  uncertainty: 'uncertainty (precision)',
  uncertaintyX: 'uncertainty x',
  uncertaintyY: 'uncertainty y',
  uncertaintyZ: 'uncertainty z',
  channel: 'channel',
  other: 'other (kept)',
  ignore: 'ignore (not stored)',
}

export const UNIT_LABELS: Record<ColumnUnit, string> = {
  nm: 'nm',
  um: 'µm',
  px: 'px (camera pixels)',
  photons: 'photons',
  adu: 'ADU (camera counts)',
}

/** The units a role may take; none for frame, channel, other and ignore. */
export function unitsFor(role: ColumnRole): readonly ColumnUnit[] {
  const kind = unitKindOf(role)
  return kind === 'length' ? LENGTH_UNITS : kind === 'intensity' ? INTENSITY_UNITS : []
}

/** A new role for a row; its unit is kept when it still fits, else the table's usual one. */
export function withRole(row: MappingRow, role: ColumnRole, lengthUnit: ColumnUnit): MappingRow {
  const kind = unitKindOf(role)
  if (!kind) return { ...row, role, unit: null }
  if (row.unit && unitFits(role, row.unit)) return { ...row, role }
  return { ...row, role, unit: kind === 'length' ? lengthUnit : 'photons' }
}

/** The unit of x, which new length columns take: one table, one convention (common practice). */
export function lengthUnitOf(rows: MappingRow[]): ColumnUnit {
  const x = rows.find((r) => r.role === 'x')?.unit
  return x && unitFits('x', x) ? x : 'nm'
}

/**
 * The dialog's starting point: the mapping already confirmed (to change it), else the server's
 * suggestion; column names from the header the inspection read. The pixel size comes from the
 * mapping, else from the dataset's description.
 */
export function draftFrom(
  validation: FileValidation,
  describedPixelNm: number | null,
): MappingDraft {
  const report = tableReportOf(validation)
  const header = report?.sniff?.header ?? []
  const suggested = report?.suggestion?.columns ?? []
  const mapped = validation.mapping?.columns
  const rows = header.map((name, index): MappingRow => {
    const from = mapped?.find((c) => c.index === index) ?? suggested.find((c) => c.index === index)
    return { index, name, role: from?.role ?? 'ignore', unit: from?.unit ?? null }
  })
  const frameBase = validation.mapping?.frameBase ?? report?.suggestion?.frameBase ?? 'auto'
  const pixel = validation.mapping?.pixelSizeNm ?? describedPixelNm
  return { rows, frameBase, pixelSize: pixel ? String(pixel) : '' }
}

/** The body of PUT …/mapping, before the schema judged it (units only where a role takes one). */
export function mappingBody(draft: MappingDraft): Record<string, unknown> {
  const pixelSizeNm = parseNumberInput(draft.pixelSize)
  return {
    columns: draft.rows.map(({ index, role, unit }) =>
      unit && unitKindOf(role) ? { index, role, unit } : { index, role },
    ),
    frameBase: draft.frameBase,
    ...(pixelSizeNm === undefined ? {} : { pixelSizeNm }),
  }
}

export interface MappingVerdict {
  mapping: ColumnMapping | null
  /** Per table column: what is wrong with its role or unit. */
  columns: Record<number, { role?: string; unit?: string }>
  pixelSize: string | null
  /** Messages about the mapping as a whole (x or y missing). */
  general: string[]
  needsPixelSize: boolean
}

/** The draft through the shared schema, its messages placed where the dialog shows them. */
export function judgeMapping(draft: MappingDraft): MappingVerdict {
  const result = columnMappingSchema.safeParse(mappingBody(draft))
  const needsPixelSize = draft.rows.some((r) => r.unit === 'px' && unitKindOf(r.role))
  const verdict: MappingVerdict = {
    ...{ mapping: result.success ? result.data : null, columns: {} },
    ...{ pixelSize: null, general: [], needsPixelSize },
  }
  for (const issue of result.success ? [] : result.error.issues) {
    const [head, position, field] = issue.path
    const row = typeof position === 'number' ? draft.rows[position] : undefined
    if (head === 'pixelSizeNm') verdict.pixelSize ??= issue.message
    else if (row && (field === 'role' || field === 'unit')) {
      const messages = (verdict.columns[row.index] ??= {})
      messages[field] ??= issue.message
    } else if (!verdict.general.includes(issue.message)) verdict.general.push(issue.message)
  }
  return verdict
}
