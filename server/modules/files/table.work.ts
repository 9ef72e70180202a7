import { suggestMapping } from '@shared/domain/localization-columns'
import type { JobWork } from '../../jobs/job-protocol'
import {
  derivedPaths,
  ingestTableJob,
  inspectTableJob,
  localOriginalOf,
  publishColumnarStore,
} from './file-job-kinds'
import { ingestLocalizationTable, sniffTable, TableFormatError } from '../../compute/ingest'

/** Reads the table's format and header and proposes a column mapping. Runs in a worker thread. */
export const inspectTableWork: JobWork = async (input, { storage, progress }) => {
  const payload = inspectTableJob.payload.parse(input)
  try {
    const sniff = await sniffTable(
      await localOriginalOf(storage, payload.sourceKey),
      payload.format ?? undefined,
    )
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

/**
 * Parses, validates and converts the whole table to the tile-ordered columnar store, written here
 * and then sent to the bucket (S3 profile; the spill file stays here). The report keeps no paths:
 * where the store lives follows from the file id.
 */
export const ingestTableWork: JobWork = async (input, { storage, progress }) => {
  const payload = ingestTableJob.payload.parse(input)
  const sourcePath = await localOriginalOf(storage, payload.sourceKey)
  // Tiles drawn from the previous store (another mapping) no longer show this table.
  await storage.removeDerivedPart(payload.fileId, 'tiles')
  const report = await ingestLocalizationTable({
    sourcePath,
    outputPath: derivedPaths(storage, payload.fileId).columnar,
    mapping: payload.mapping,
    format: payload.format ?? undefined,
    limits: payload.limits,
    onProgress: (f) => progress(f, 'parsing and converting'),
  })
  await publishColumnarStore(storage, payload.fileId)
  const { arrowPath: _arrow, indexPath: _index, ...output } = report.output
  return { ...report, output, derivedBytes: await storage.derivedBytes(payload.fileId) }
}
