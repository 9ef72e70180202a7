import { z } from 'zod'
import { metadataSchema } from '../metadata/metadata.schema'
import { COLUMN_ROLES, COLUMN_UNITS, FRAME_BASES } from '../domain/localization-columns'
import { FILE_STATUSES } from '../domain/files'
import { columnMappingSchema, tableFormatChoiceSchema } from './localization-mapping.schema'

/**
 * `GET /api/datasets/:id/files/:fileId/validation`: what the inspection, the ingest or the stack
 * scan found, for those who may see previews. It never holds a server path. The table's own
 * content (its first rows, the text of rejected rows) is only sent to those who may download the
 * file; for everyone else `sampleRows` is empty and examples carry their line number only.
 */

const boundsSchema = z.object({
  xMin: z.number(),
  xMax: z.number(),
  yMin: z.number(),
  yMax: z.number(),
})

export const tableSniffSchema = z.object({
  delimiter: z.string(),
  hasHeader: z.boolean(),
  header: z.array(z.string()),
  /** The first rows as text; empty for those who may not download the file. */
  sampleRows: z.array(z.array(z.string())),
  compression: z.string(),
  decimalMark: z.string(),
  dataStartLine: z.number().optional(),
  problems: z.array(z.string()),
})

export const rejectExampleSchema = z.object({
  /** 1-based line of the file where the record starts. */
  line: z.number(),
  column: z.string().optional(),
  /** The rejected record as text; only for those who may download the file. */
  text: z.string().optional(),
  detail: z.string().optional(),
})

export const mappingSuggestionSchema = z.object({
  columns: z.array(
    z.object({
      index: z.number(),
      name: z.string(),
      role: z.enum(COLUMN_ROLES),
      unit: z.enum(COLUMN_UNITS).nullable(),
    }),
  ),
  frameBase: z.literal(FRAME_BASES),
  confident: z.boolean(),
  problems: z.array(z.string()),
  /** What the suggestion chose where the header offered a choice (a drift-corrected x). */
  notes: z.array(z.string()).optional(),
})

export const ingestedColumnSchema = z.object({
  name: z.string(),
  role: z.enum(COLUMN_ROLES),
  unit: z.string().nullable(),
  sourceColumn: z.string().optional(),
  sourceUnit: z.enum(COLUMN_UNITS).nullable().optional(),
  min: z.number().nullable(),
  max: z.number().nullable(),
  count: z.number(),
  missing: z.number().optional(),
})

export const tableReportSchema = z
  .object({
    sniff: tableSniffSchema.optional(),
    /** The separator the depositor declared (PUT …/format), when they did. */
    declaredFormat: tableFormatChoiceSchema.nullable().optional(),
    suggestion: mappingSuggestionSchema.optional(),
    rowsRead: z.number().optional(),
    rowsAccepted: z.number().optional(),
    rowsRejected: z.number().optional(),
    rejected: z
      .record(
        z.string(),
        z.object({
          count: z.number(),
          description: z.string(),
          examples: z.array(rejectExampleSchema),
        }),
      )
      .optional(),
    columns: z.array(ingestedColumnSchema).optional(),
    boundsNm: boundsSchema.nullable().optional(),
    /** Stored frame numbers, counted from 0. */
    frames: z
      .object({ first: z.number(), last: z.number(), sourceBase: z.literal([0, 1]) })
      .nullable()
      .optional(),
    aduColumns: z.array(z.string()).optional(),
    problems: z.array(z.string()).optional(),
  })
  .meta({ id: 'TableReport' })
export type TableReport = z.output<typeof tableReportSchema>
export type TableSniff = z.output<typeof tableSniffSchema>
export type RejectExample = z.output<typeof rejectExampleSchema>
export type IngestedColumn = z.output<typeof ingestedColumnSchema>

/** What an OME-XML document would fill in, and what of it has no place here (with why). */
export const omeImportReportSchema = z.object({
  metadata: metadataSchema,
  mapped: z.array(z.object({ path: z.string(), from: z.string(), value: z.unknown() })),
  ignored: z.array(z.object({ from: z.string(), reason: z.string() })),
})

export const stackReportSchema = z
  .object({
    format: z.string(),
    byteOrder: z.string(),
    width: z.number(),
    height: z.number(),
    frames: z.number(),
    bitsPerSample: z.number(),
    sampleFormat: z.string(),
    compression: z.string(),
    /** For a multi-file OME-TIFF: the file names its OME-XML lists. */
    fileSet: z.array(z.string()),
    hasOmeXml: z.boolean(),
    /** The stack's embedded description, as a prefill the depositor reviews. */
    omePrefill: z.union([omeImportReportSchema, z.object({ error: z.string() })]).nullable(),
    trace: z.object({ min: z.number(), max: z.number(), mean: z.number() }).optional(),
    thumbnail: z.object({ width: z.number(), height: z.number() }).optional(),
  })
  .meta({ id: 'StackReport' })
export type StackReport = z.output<typeof stackReportSchema>
export type OmeImportReport = z.output<typeof omeImportReportSchema>
export type OmePrefill = StackReport['omePrefill']

const validationBase = {
  id: z.number(),
  name: z.string(),
  status: z.enum(FILE_STATUSES),
  problem: z.string().nullable(),
  mapping: columnMappingSchema.nullable(),
}

export const fileValidationSchema = z
  .discriminatedUnion('kind', [
    z.object({
      ...validationBase,
      kind: z.literal('localization_table'),
      report: tableReportSchema.nullable(),
    }),
    z.object({
      ...validationBase,
      kind: z.literal('raw_stack'),
      report: stackReportSchema.nullable(),
    }),
    z.object({
      ...validationBase,
      kind: z.enum(['metadata', 'other']),
      report: z.null(),
    }),
  ])
  .meta({ id: 'FileValidation' })
export type FileValidation = z.output<typeof fileValidationSchema>
