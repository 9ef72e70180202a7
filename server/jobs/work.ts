import { ingestTableJob, inspectTableJob, scanRawStackJob } from '../modules/files/file-job-kinds'
import { scanRawStackWork } from '../modules/files/raw-stack.work'
import { ingestTableWork, inspectTableWork } from '../modules/files/table.work'
import { computeQualityJob } from '../modules/quality/quality-job-kind'
import { computeQualityWork } from '../modules/quality/quality.work'
import { queueProbeJob, queueProbeWork } from './queue-probe.job'
import type { JobWork } from './job-protocol'

/** The kinds of work a worker thread can do, by kind name. Each module registers its own here. */
export const JOB_WORK: Record<string, JobWork> = {
  [inspectTableJob.name]: inspectTableWork,
  [ingestTableJob.name]: ingestTableWork,
  [scanRawStackJob.name]: scanRawStackWork,
  [computeQualityJob.name]: computeQualityWork,
  [queueProbeJob.name]: queueProbeWork,
}
