import { suggestMapping } from '@shared/domain/localization-columns'
import type { JobWork } from '../../jobs/job-protocol'
import { ingestLocalizationTable, sniffTable, TableFormatError } from './localizations'
import type { FormatOverrides } from './localizations/table.sniffer'

/** What the depositor declared about the table's format (PUT …/format), over what is sniffed. */
const declaredFormat = (payload: Record<string, unknown>) =>
  (payload.format as FormatOverrides | null | undefined) ?? undefined

/** Reads the table's format and header and proposes a column mapping. Runs in a worker thread. */
export const inspectTableWork: JobWork = async (payload, progress) => {
  try {
    const sniff = await sniffTable(String(payload.source), declaredFormat(payload))
    progress(1, 'format read')
    return { sniff, suggestion: suggestMapping(sniff.header, sniff.sampleRows) }
  } catch (err) {
    throw new Error(
      err instanceof TableFormatError
        ? err.message
        : `The table could not be read: ${err instanceof Error ? err.message : String(err)}`,
    )
  }
}

/** Parses, validates and converts the whole table to the tile-ordered columnar store. */
export const ingestTableWork: JobWork = async (payload, progress) => {
  return ingestLocalizationTable({
    sourcePath: String(payload.source),
    outputPath: String(payload.output),
    mapping: payload.mapping as never,
    format: declaredFormat(payload),
    // The worker thread of this job is itself one of the two cores' worth; let the engine decide.
    onProgress: (f) => progress(f, 'parsing and converting'),
  })
}
