import { z } from 'zod'
import { defineJobKind } from './job-kind'
import type { JobWork } from './job-protocol'

/** For tests of the queue itself: waits `ms`, reporting progress, then echoes its payload. */
export const queueProbeJob = defineJobKind({
  name: 'queue-probe',
  payload: z.object({
    subjectId: z.int().default(0),
    ms: z.number().min(0).default(0),
    n: z.number().optional(),
    fail: z.string().optional(),
    key: z.string().optional(),
  }),
  subject: (p) => ({ type: 'dataset', id: p.subjectId }),
  // Probes run side by side unless a test gives them one key.
  dedupeKey: (p) => p.key ?? `probe:${Math.random()}`,
})

export const queueProbeWork: JobWork = async (input, { progress }) => {
  const payload = queueProbeJob.payload.parse(input)
  const steps = 10
  for (let i = 1; i <= steps; i++) {
    await new Promise((r) => setTimeout(r, payload.ms / steps))
    progress(i / steps, `step ${i}`)
  }
  if (payload.fail) throw new Error(payload.fail)
  return { echoed: input }
}
