import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { QualityFindings, QualityReportDto } from '@shared/schemas/quality.schema'
import { ConflictError } from '../../errors/http-error'
import { Job, type IJob } from '../../jobs/job.entity'
import type { IDatasetFile } from '../files/dataset-file.entity'
import { computeQualityJob } from './quality-job-kind'
import { QualityReport, type IQualityReport } from './quality-report.entity'

const NOTHING_YET: QualityFindings = {
  localizations: null,
  frames: null,
  photonsMedian: null,
  precisionMedianNm: null,
  expectedPrecisionNm: null,
  nenaPrecisionNm: null,
  frcResolutionNm: null,
  frcResolutionUncorrectedNm: null,
  frcDriftCorrectedNm: null,
  localizationsPerEmitter: null,
  nyquistResolutionNm: null,
  diffractionLimitNm: null,
  driftNm: null,
  drift: null,
  mergedEmitters: null,
  metrics: {},
}

/**
 * The quality report of a table as its readers see it: the latest findings, and the state of the
 * work on it (queued or running with progress while a new report is computed, failed with the
 * reason in words).
 */
export async function qualityReportOf(
  em: EntityManager,
  file: IDatasetFile,
): Promise<QualityReportDto> {
  if (file.kind !== 'localization_table')
    throw new ConflictError(`"${file.name}" is not a localization table; it has no quality report.`)
  const [report, job] = await Promise.all([
    em.findOne(QualityReport, { file: file.id }),
    em.findOne(
      Job,
      { kind: computeQualityJob.name, subjectType: 'file', subjectId: file.id },
      { orderBy: { id: 'desc' } },
    ),
  ])
  return reportAsRead(file, report, job)
}

/** The report a reader sees, from the stored findings and the latest quality job of the table. */
export function reportAsRead(
  file: IDatasetFile,
  report: IQualityReport | null,
  job: IJob | null,
): QualityReportDto {
  const base = {
    ...(report?.findings ?? NOTHING_YET),
    computedAt: report?.computedAt.toISOString() ?? null,
    error: null,
  }
  if (job && (job.state === 'queued' || job.state === 'running'))
    return { ...base, status: job.state, progress: job.progress, message: job.message ?? null }
  if (job?.state === 'failed' && !report)
    return { ...base, status: 'failed', progress: 0, message: null, error: job.error ?? null }
  if (report) return { ...base, status: 'done', progress: 1, message: null }
  // Not computed yet: the table is still being read (or waits for its column mapping).
  const waiting =
    file.status === 'needs_mapping'
      ? 'Waiting for the column mapping.'
      : file.status === 'rejected'
        ? 'The table could not be read, so it has no report.'
        : 'Waiting for the table to be read.'
  return {
    ...base,
    status: file.status === 'rejected' ? 'failed' : 'queued',
    progress: 0,
    message: waiting,
  }
}
