import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { MappingSuggestion } from '@shared/domain/localization-columns'
import {
  mappingFromSuggestion,
  type ColumnMapping,
  type TableFormatChoice,
} from '@shared/schemas/localization-mapping.schema'
import { enqueue } from '../../jobs/job-queue'
import type { JobCompletion } from '../../jobs/job-runner'
import type { IJob } from '../../jobs/job.entity'
import { DatasetMetadata } from '../metadata/dataset-metadata.entity'
import { queueQuality } from '../quality/quality-jobs'
import { DatasetFile, type IDatasetFile } from './dataset-file.entity'
import { rejectOnFailure } from './file-job-failure'
import type { AppConfig } from '../../config'
import { ingestLimitsFor } from './file-jobs'
import { ingestTableJob, inspectTableJob } from './file-job-kinds'
import type { IngestReport, TableSniff } from '../../compute/ingest'

/** The pixel size from the dataset's description, for tables in camera pixels. */
async function pixelSizeOf(em: EntityManager, datasetId: number): Promise<number | undefined> {
  const meta = await em.findOne(DatasetMetadata, { dataset: datasetId })
  return meta?.document.instrument?.detector?.pixelSizeNm
}

export type IngestSettings = Pick<AppConfig, 'ingest' | 'uploads'>

/** Queues the ingest of a table with a confirmed mapping, within the site's and project's limits. */
export async function queueIngest(
  em: EntityManager,
  file: IDatasetFile,
  mapping: ColumnMapping,
  settings: IngestSettings,
) {
  file.mapping = mapping
  file.status = 'processing'
  file.problem = null
  await enqueue(em, ingestTableJob, {
    fileId: file.id,
    sourceKey: file.storageKey,
    mapping,
    format: declaredFormatOf(file),
    limits: await ingestLimitsFor(em, settings, file),
  })
}

/** The format the depositor declared for the table, kept in its report by the last inspection. */
function declaredFormatOf(file: IDatasetFile): TableFormatChoice | null {
  return (file.report as { declaredFormat?: TableFormatChoice } | null)?.declaredFormat ?? null
}

/** Reads the table's header again, with the depositor's declared format over the sniffed one. */
export async function queueInspect(
  em: EntityManager,
  file: IDatasetFile,
  format: TableFormatChoice,
) {
  file.status = 'processing'
  file.problem = null
  await enqueue(em, inspectTableJob, { fileId: file.id, sourceKey: file.storageKey, format })
}

const inspect = (settings: IngestSettings): JobCompletion => ({
  async done(em, job: IJob, result) {
    const file = job.file == null ? null : await em.findOne(DatasetFile, { id: job.file })
    if (!file) return
    const { sniff, suggestion } = result as { sniff: TableSniff; suggestion: MappingSuggestion }
    file.report = {
      sniff: { ...sniff, sampleRows: sniff.sampleRows.slice(0, 10) },
      suggestion,
      declaredFormat: inspectTableJob.payload.parse(job.payload).format ?? null,
    }
    let mapping = mappingFromSuggestion(suggestion)
    // A header in pixels leaves no doubt once the description gives the pixel size.
    if (mapping && mapping.columns.some((c) => c.unit === 'px')) {
      const pixelSizeNm = await pixelSizeOf(em, file.dataset)
      mapping = pixelSizeNm ? { ...mapping, pixelSizeNm } : null
    }
    if (mapping) {
      await queueIngest(em, file, mapping, settings)
      return
    }
    file.status = 'needs_mapping'
    file.problem = suggestion.problems.length
      ? suggestion.problems.join(' ')
      : 'Confirm which column is which before the table can be read.'
  },
  failed: rejectOnFailure,
})

const ingest: JobCompletion = {
  async done(em, job, result) {
    const file = job.file == null ? null : await em.findOne(DatasetFile, { id: job.file })
    if (!file) return
    const { derivedBytes, ...report } = result as IngestReport & { derivedBytes: number }
    file.report = { ...(file.report ?? {}), ...report }
    file.derivedBytes = derivedBytes
    if (report.rowsAccepted === 0) {
      file.status = 'rejected'
      file.problem = 'No row of the table could be read; see the validation report.'
    } else {
      file.status = 'ready'
      await queueQuality(em, file)
      file.problem = report.rowsRejected
        ? `${report.rowsRejected} of ${report.rowsRead} rows were rejected; see the validation report.`
        : null
    }
  },
  failed: rejectOnFailure,
}

/** Completions of the localization-table jobs (inspect, ingest). */
export function tableCompletions(settings: IngestSettings): Record<string, JobCompletion> {
  return { [inspectTableJob.name]: inspect(settings), [ingestTableJob.name]: ingest }
}
