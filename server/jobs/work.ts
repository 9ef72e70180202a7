import { FILE_JOBS } from '../modules/files/file-processing'
import { scanRawStackWork } from '../modules/files/raw-stack.work'
import { ingestTableWork, inspectTableWork } from '../modules/files/table.work'
import type { JobWork } from './job-protocol'

/** The kinds of work a worker thread can do. Each module registers itself here. */
export const JOB_WORK: Record<string, JobWork> = {
  [FILE_JOBS.inspectTable]: inspectTableWork,
  [FILE_JOBS.ingestTable]: ingestTableWork,
  [FILE_JOBS.scanRawStack]: scanRawStackWork,
  /** For tests of the queue itself: waits `ms`, reporting progress, then echoes its payload. */
  'queue-probe': async (payload, progress) => {
    const ms = Number(payload.ms ?? 0)
    const steps = 10
    for (let i = 1; i <= steps; i++) {
      await new Promise((r) => setTimeout(r, ms / steps))
      progress(i / steps, `step ${i}`)
    }
    if (payload.fail) throw new Error(String(payload.fail))
    return { echoed: payload }
  },
}
