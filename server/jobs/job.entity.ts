import { defineEntity, p, type InferEntity } from '@mikro-orm/core'
import { DatasetFile } from '../modules/files/dataset-file.entity'

export const JOB_STATES = ['queued', 'running', 'done', 'failed'] as const
export type JobState = (typeof JOB_STATES)[number]

/**
 * A unit of heavy work (ingest, raw-stack scan), persisted so that a restart resumes it: jobs
 * found running at start-up were cut off and go back to the queue.
 */
export const Job = defineEntity({
  name: 'Job',
  indexes: [{ properties: ['state', 'id'] }],
  properties: {
    id: p.integer().primary(),
    kind: p.string(),
    payload: p.json<Record<string, unknown>>(),
    state: p.string().$type<JobState>().default('queued'),
    progress: p.float().default(0),
    message: p.string().nullable(),
    error: p.text().nullable(),
    attempts: p.integer().default(0),
    file: p.manyToOne(DatasetFile).mapToPk().nullable().deleteRule('cascade').index(),
    createdAt: p.datetime().onCreate(() => new Date()),
    startedAt: p.datetime().nullable(),
    /** Raised every few seconds while a process works on the job; a stale one means it died. */
    heartbeatAt: p.datetime().nullable(),
    finishedAt: p.datetime().nullable(),
  },
})
export type IJob = InferEntity<typeof Job>
