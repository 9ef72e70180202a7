import { ingestTableJob, inspectTableJob, scanRawStackJob } from '../modules/files/file-job-kinds'
import { computeQualityJob } from '../modules/quality/quality-job-kind'
import type { JobKind } from './job-kind'
import { queueProbeJob } from './queue-probe.job'

/** Every kind of job, as the modules declare them (the worker's work table lists the same). */
export const JOB_KINDS: readonly JobKind[] = [
  inspectTableJob,
  ingestTableJob,
  scanRawStackJob,
  computeQualityJob,
  queueProbeJob,
]

/** Kinds whose thread ends with the job (see JobKind.freshThread). */
export const FRESH_THREAD_KINDS: ReadonlySet<string> = new Set(
  JOB_KINDS.filter((k) => k.freshThread).map((k) => k.name),
)
