import type { QualityFindings } from '@shared/schemas/quality.schema'
import type { JobCompletion } from '../../jobs/job-runner'
import { computeQualityJob } from './quality-job-kind'
import { QualityReport } from './quality-report.entity'

/** A finished report replaces the file's previous one. */
const computeQuality: JobCompletion = {
  async done(em, job, result) {
    const { fileId, inputs } = computeQualityJob.payload.parse(job.payload)
    const findings = result as QualityFindings
    const existing = await em.findOne(QualityReport, { file: fileId })
    if (existing) Object.assign(existing, { findings, inputs, computedAt: new Date() })
    else em.create(QualityReport, { file: fileId, findings, inputs, computedAt: new Date() })
  },
}

export function qualityCompletions(): Record<string, JobCompletion> {
  return { [computeQualityJob.name]: computeQuality }
}
