import type { JobCompletion } from '../../jobs/job-runner'

/** Completions of the localization-table jobs (inspect, ingest); see table.work.ts. */
export function tableCompletions(): Record<string, JobCompletion> {
  return {}
}
