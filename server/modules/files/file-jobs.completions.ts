import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { JobCompletion } from '../../jobs/job-runner'
import type { IJob } from '../../jobs/job.entity'
import { importOmeXml } from '../metadata/ome/ome-import'
import { DatasetFile } from './dataset-file.entity'
import { FILE_JOBS } from './file-processing'
import type { RawStackReport } from './raw-stack.work'
import { rejectOnFailure } from './file-job-failure'
import { tableCompletions } from './table-jobs.completions'

async function fileOf(em: EntityManager, job: IJob) {
  return job.file == null ? null : em.findOne(DatasetFile, { id: job.file })
}

const scanRawStack: JobCompletion = {
  async done(em, job, result) {
    const file = await fileOf(em, job)
    if (!file) return
    const report = result as RawStackReport
    // Embedded OME-XML becomes a prefill the depositor reviews before it touches the description.
    let omePrefill: unknown = null
    if (report.omeXml) {
      try {
        omePrefill = importOmeXml(report.omeXml)
      } catch (err) {
        omePrefill = { error: err instanceof Error ? err.message : String(err) }
      }
    }
    file.report = { ...report, omeXml: undefined, hasOmeXml: report.omeXml !== null, omePrefill }
    file.status = 'ready'
    file.problem = null
  },
  failed: rejectOnFailure,
}

export function fileJobCompletions(): Record<string, JobCompletion> {
  return { [FILE_JOBS.scanRawStack]: scanRawStack, ...tableCompletions() }
}
