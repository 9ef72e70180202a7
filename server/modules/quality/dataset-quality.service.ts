import type { EntityManager } from '@mikro-orm/better-sqlite'
import { datasetPsfSigmaNm, verdictChips } from '@shared/domain/quality-summary'
import type {
  DatasetQualityDto,
  DatasetQualityItem,
  QualityReportDto,
} from '@shared/schemas/quality.schema'
import { Job, type IJob } from '../../jobs/job.entity'
import { DatasetFile, type IDatasetFile } from '../files/dataset-file.entity'
import { computeQualityJob } from './quality-job-kind'
import { QualityReport } from './quality-report.entity'
import { reportAsRead } from './quality.service'

/**
 * The quality of every localization table of one dataset, in three queries whatever the number
 * of tables: the tables, their reports, and their quality jobs (the latest one counts), with the
 * median fitted PSF width of the tables that have a sigma column.
 */
export async function datasetQualityOf(
  em: EntityManager,
  datasetId: number,
): Promise<DatasetQualityDto> {
  const files = await em.find(
    DatasetFile,
    { dataset: datasetId, kind: 'localization_table' },
    { orderBy: { id: 'asc' } },
  )
  if (!files.length) return { items: [], psfSigmaMedianNm: null }
  const ids = files.map((f) => f.id)
  const [reports, jobs] = await Promise.all([
    em.find(QualityReport, { file: { $in: ids } }),
    em.find(
      Job,
      { kind: computeQualityJob.name, subjectType: 'file', subjectId: { $in: ids } },
      { orderBy: { id: 'desc' } },
    ),
  ])
  const reportOf = new Map(reports.map((r) => [r.file, r]))
  const latestJob = new Map<number, IJob>()
  for (const job of jobs) if (!latestJob.has(job.subjectId)) latestJob.set(job.subjectId, job)
  const read = files.map((file) =>
    reportAsRead(file, reportOf.get(file.id) ?? null, latestJob.get(file.id) ?? null),
  )
  return {
    items: files.map((file, i) => summaryOf(file, read[i]!)),
    // The expected-precision panel's measured PSF width (DOMAIN.md §6: prefer the measured one).
    psfSigmaMedianNm: datasetPsfSigmaNm(read),
  }
}

/** A table's row: the headline numbers and verdicts of its latest findings, if it has any. */
function summaryOf(file: IDatasetFile, report: QualityReportDto): DatasetQualityItem {
  return {
    fileId: file.id,
    fileName: file.name,
    status: report.status,
    progress: report.progress,
    message: report.error ?? report.message,
    computedAt: report.computedAt,
    localizations: report.localizations,
    precisionMedianNm: report.precisionMedianNm,
    frcResolutionNm: report.frcResolutionNm,
    driftNm: report.driftNm,
    verdicts: report.computedAt ? verdictChips(report) : [],
  }
}
