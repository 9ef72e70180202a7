import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { MappingSuggestion } from '@shared/domain/localization-columns'
import {
  mappingFromSuggestion,
  type ColumnMapping,
  type TableFormatChoice,
} from '@shared/schemas/localization-mapping.schema'
import { enqueueJob } from '../../jobs/job-queue'
import type { JobCompletion } from '../../jobs/job-runner'
import type { IJob } from '../../jobs/job.entity'
import { DatasetMetadata } from '../metadata/dataset-metadata.entity'
import { DatasetFile, type IDatasetFile } from './dataset-file.entity'
import { rejectOnFailure } from './file-job-failure'
import { FILE_JOBS } from './file-processing'
import type { IngestReport, TableSniff } from './localizations'

/** The pixel size from the dataset's description, for tables in camera pixels. */
async function pixelSizeOf(em: EntityManager, datasetId: number): Promise<number | undefined> {
  const meta = await em.findOne(DatasetMetadata, { dataset: datasetId })
  return meta?.document.instrument?.detector?.pixelSizeNm
}

/** Queues the ingest of a table with a confirmed mapping. */
export function queueIngest(
  em: EntityManager,
  file: IDatasetFile,
  mapping: ColumnMapping,
  paths: { source: string; output: string },
) {
  file.mapping = mapping
  file.status = 'processing'
  file.problem = null
  enqueueJob(em, {
    kind: FILE_JOBS.ingestTable,
    payload: { fileId: file.id, ...paths, mapping, format: declaredFormatOf(file) },
    fileId: file.id,
  })
}

/** The format the depositor declared for the table, kept in its report by the last inspection. */
function declaredFormatOf(file: IDatasetFile): TableFormatChoice | null {
  return (file.report as { declaredFormat?: TableFormatChoice } | null)?.declaredFormat ?? null
}

/** Reads the table's header again, with the depositor's declared format over the sniffed one. */
export function queueInspect(
  em: EntityManager,
  file: IDatasetFile,
  format: TableFormatChoice,
  paths: { source: string; output: string },
) {
  file.status = 'processing'
  file.problem = null
  enqueueJob(em, {
    kind: FILE_JOBS.inspectTable,
    payload: { fileId: file.id, ...paths, format },
    fileId: file.id,
  })
}

const inspect: JobCompletion = {
  async done(em, job: IJob, result) {
    const file = job.file == null ? null : await em.findOne(DatasetFile, { id: job.file })
    if (!file) return
    const { sniff, suggestion } = result as { sniff: TableSniff; suggestion: MappingSuggestion }
    file.report = {
      sniff: { ...sniff, sampleRows: sniff.sampleRows.slice(0, 10) },
      suggestion,
      declaredFormat: (job.payload.format as TableFormatChoice | undefined) ?? null,
    }
    let mapping = mappingFromSuggestion(suggestion)
    // A header in pixels leaves no doubt once the description gives the pixel size.
    if (mapping && mapping.columns.some((c) => c.unit === 'px')) {
      const pixelSizeNm = await pixelSizeOf(em, file.dataset)
      mapping = pixelSizeNm ? { ...mapping, pixelSizeNm } : null
    }
    if (mapping) {
      queueIngest(em, file, mapping, {
        source: String(job.payload.source),
        output: String(job.payload.output),
      })
      return
    }
    file.status = 'needs_mapping'
    file.problem = suggestion.problems.length
      ? suggestion.problems.join(' ')
      : 'Confirm which column is which before the table can be read.'
  },
  failed: rejectOnFailure,
}

const ingest: JobCompletion = {
  async done(em, job, result) {
    const file = job.file == null ? null : await em.findOne(DatasetFile, { id: job.file })
    if (!file) return
    const report = result as IngestReport
    file.report = { ...(file.report ?? {}), ...report }
    if (report.rowsAccepted === 0) {
      file.status = 'rejected'
      file.problem = 'No row of the table could be read; see the validation report.'
    } else {
      file.status = 'ready'
      file.problem = report.rowsRejected
        ? `${report.rowsRejected} of ${report.rowsRead} rows were rejected; see the validation report.`
        : null
    }
  },
  failed: rejectOnFailure,
}

/** Completions of the localization-table jobs (inspect, ingest). */
export function tableCompletions(): Record<string, JobCompletion> {
  return { [FILE_JOBS.inspectTable]: inspect, [FILE_JOBS.ingestTable]: ingest }
}
