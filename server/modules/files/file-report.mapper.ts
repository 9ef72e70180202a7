import type { ColumnMapping } from '@shared/schemas/localization-mapping.schema'
import {
  stackReportSchema,
  tableReportSchema,
  type FileValidation,
  type StackReport,
  type TableReport,
} from '@shared/schemas/file-report.schema'
import type { IDatasetFile } from './dataset-file.entity'

type RawReport = Record<string, unknown>

/**
 * A table's report as the documented schema has it. Parsing strips what the jobs keep for
 * themselves (timings, the store's layout); without the download right the table's own text (its
 * first rows, rejected records) is left out too.
 */
function tableReport(raw: RawReport, withContent: boolean): TableReport | null {
  const parsed = tableReportSchema.safeParse(raw)
  if (!parsed.success) return null
  const report = parsed.data
  if (withContent) return report
  return {
    ...report,
    sniff: report.sniff && { ...report.sniff, sampleRows: [] },
    rejected:
      report.rejected &&
      Object.fromEntries(
        Object.entries(report.rejected).map(([reason, r]) => [
          reason,
          { ...r, examples: r.examples.map(({ text: _text, ...example }) => example) },
        ]),
      ),
  }
}

/** A stack's report; a prefill that no longer fits today's description schema is dropped alone. */
function stackReport(raw: RawReport): StackReport | null {
  const parsed = stackReportSchema.safeParse(raw)
  if (parsed.success) return parsed.data
  const withoutPrefill = stackReportSchema.safeParse({ ...raw, omePrefill: null })
  return withoutPrefill.success ? withoutPrefill.data : null
}

/** `GET …/files/:fileId/validation` for someone who may preview the file's dataset. */
export function toFileValidation(file: IDatasetFile, withContent: boolean): FileValidation {
  const base = {
    id: file.id,
    name: file.name,
    status: file.status,
    problem: file.problem ?? null,
    mapping: (file.mapping as ColumnMapping | null) ?? null,
  }
  const raw = file.report as RawReport | null
  if (file.kind === 'localization_table')
    return { ...base, kind: file.kind, report: raw ? tableReport(raw, withContent) : null }
  if (file.kind === 'raw_stack')
    return { ...base, kind: file.kind, report: raw ? stackReport(raw) : null }
  return { ...base, kind: file.kind, report: null }
}
