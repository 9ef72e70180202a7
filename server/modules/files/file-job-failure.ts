import type { JobCompletion } from '../../jobs/job-runner'
import { DatasetFile } from './dataset-file.entity'

/** A job that failed leaves its file rejected, with the reason in words. */
export const rejectOnFailure: JobCompletion['failed'] = async (em, job, error) => {
  const file = job.file == null ? null : await em.findOne(DatasetFile, { id: job.file })
  if (!file) return
  file.status = 'rejected'
  file.problem = error
}
