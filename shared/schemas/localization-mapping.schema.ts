import { z } from 'zod'
import {
  COLUMN_ROLES,
  COLUMN_UNITS,
  FRAME_BASES,
  PSF_WIDTH_ROLES,
  REPEATABLE_ROLES,
  unitFits,
  unitKindOf,
  type MappingSuggestion,
} from '../domain/localization-columns'

/** How the fields of a localization table can be separated; `whitespace`: runs of spaces or tabs. */
export const TABLE_DELIMITERS = [',', '\t', ';', '|', 'whitespace'] as const
export type TableDelimiter = (typeof TABLE_DELIMITERS)[number]

/**
 * Body of `PUT /api/datasets/:id/files/:fileId/format`: the depositor says how the fields are
 * separated when the sniffed guess is wrong; the table's header and columns are read again.
 */
export const tableFormatChoiceSchema = z
  .object({ delimiter: z.enum(TABLE_DELIMITERS) })
  .meta({ id: 'TableFormatChoice' })
export type TableFormatChoice = z.output<typeof tableFormatChoiceSchema>

export const mappedColumnSchema = z.object({
  /** 0-based position of the column in the table. */
  index: z.int().min(0).max(9_999),
  role: z.enum(COLUMN_ROLES),
  /** Needed for positions, widths, photons and background; absent for the other roles. */
  unit: z.enum(COLUMN_UNITS).optional(),
})

type MappingShape = {
  columns: z.output<typeof mappedColumnSchema>[]
  pixelSizeNm?: number | undefined
}

/** Body of `PUT /api/datasets/:id/files/:fileId/mapping`: how to read a localization table. */
export const columnMappingSchema = z
  .object({
    columns: z.array(mappedColumnSchema).min(2).max(10_000),
    /** Whether the table counts frames from 0 or from 1; `auto`: from the lowest frame. */
    frameBase: z.literal(FRAME_BASES),
    /** Camera pixel at the sample, nm; needed when any column is in px. */
    pixelSizeNm: z.number().positive().lt(10_000).optional(),
  })
  .superRefine((mapping, ctx) => {
    for (const issue of mappingIssues(mapping)) ctx.addIssue({ code: 'custom', ...issue })
  })
  .meta({ id: 'ColumnMapping' })
export type ColumnMapping = z.output<typeof columnMappingSchema>
export type ColumnMappingInput = z.input<typeof columnMappingSchema>

interface Issue {
  message: string
  path: (string | number)[]
}

function mappingIssues(mapping: MappingShape): Issue[] {
  const issues: Issue[] = []
  const seenRole = new Set<string>()
  const seenIndex = new Set<number>()
  mapping.columns.forEach((column, i) => {
    if (seenIndex.has(column.index))
      issues.push({
        message: `Column ${column.index} is mapped twice`,
        path: ['columns', i, 'index'],
      })
    seenIndex.add(column.index)
    if (seenRole.has(column.role) && !REPEATABLE_ROLES.includes(column.role))
      issues.push({
        message: `Only one column can be ${column.role}`,
        path: ['columns', i, 'role'],
      })
    seenRole.add(column.role)
    const unitIssue = unitProblem(column)
    if (unitIssue) issues.push({ message: unitIssue, path: ['columns', i, 'unit'] })
  })
  if (mapping.columns.filter((c) => PSF_WIDTH_ROLES.includes(c.role)).length > 1) {
    issues.push({
      message: 'Give the PSF width once: as sigma or as FWHM',
      path: ['columns'],
    })
  }
  for (const axis of ['x', 'y'] as const) {
    if (!seenRole.has(axis))
      issues.push({ message: `Map one column to ${axis}`, path: ['columns'] })
  }
  if (mapping.columns.some((c) => c.unit === 'px') && mapping.pixelSizeNm === undefined) {
    issues.push({ message: 'Columns in px need the pixel size in nm', path: ['pixelSizeNm'] })
  }
  return issues
}

function unitProblem({ role, unit }: z.output<typeof mappedColumnSchema>): string | null {
  const kind = unitKindOf(role)
  if (!kind) return unit ? `A ${role} column takes no unit` : null
  if (!unit)
    return kind === 'length'
      ? `${role} needs a unit (nm, um or px)`
      : `${role} needs a unit (photons or adu)`
  return unitFits(role, unit) ? null : `${unit} is not a unit for ${role}`
}

/** The suggestion as a mapping, when it is confident enough to use without asking. */
export function mappingFromSuggestion(suggestion: MappingSuggestion): ColumnMapping | null {
  if (!suggestion.confident) return null
  const parsed = columnMappingSchema.safeParse({
    columns: suggestion.columns.map(({ index, role, unit }) =>
      unit ? { index, role, unit } : { index, role },
    ),
    frameBase: suggestion.frameBase,
  })
  return parsed.success ? parsed.data : null
}
